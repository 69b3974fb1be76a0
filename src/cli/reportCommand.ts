/** `brink report <run-dir> --out report.html`: the self-contained HTML report of a saved run. */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, parseNumber, requireValue } from './args.ts';
import { readSavedRun } from './savedRunFiles.ts';
import { renderReport } from '../core/report/renderReport.ts';

export const REPORT_FLAGS: FlagTable = {
  out: { kind: 'string', placeholder: '<report.html>', description: 'the HTML file to write' },
  title: { kind: 'string', placeholder: '<text>', description: 'heading of the report (default "Robustness evaluation")' },
  purpose: { kind: 'string', placeholder: '<text>', description: 'replaces the first paragraph of "Purpose and scope"' },
  gallery: { kind: 'string', placeholder: '<N>', description: 'flipped samples shown in the gallery excerpt (default 12)' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const REPORT_USAGE = formatUsage('report', '<run-dir | run.brink.json> --out report.html [options]', REPORT_FLAGS);

/** Run the report command; resolves when the file is written. */
export async function reportCommand(args: ParsedArgs): Promise<void> {
  if (args.flags.has('help')) {
    process.stdout.write(`${REPORT_USAGE}\n`);
    return;
  }
  if (args.positional.length !== 1) throw new UsageError(args.positional.length === 0 ? 'report: give one run folder (written by sweep --out)' : `report: give one run folder, got ${args.positional.length}`);
  const out = requireValue(args, 'out');
  const galleryText = args.values.get('gallery');
  const galleryLimit = galleryText === undefined ? undefined : parseNumber(galleryText, '--gallery', { integer: true, min: 0 });
  const { file, run } = await readSavedRun(args.positional[0]!);
  const title = args.values.get('title');
  const purpose = args.values.get('purpose');
  const text = renderReport(run, {
    generatedAt: new Date().toISOString(),
    ...(title !== undefined ? { title } : {}),
    ...(purpose !== undefined ? { purpose } : {}),
    ...(galleryLimit !== undefined ? { galleryLimit } : {}),
  });
  await mkdir(path.dirname(path.resolve(out)), { recursive: true });
  await writeFile(out, text);
  process.stderr.write(`brink: wrote ${out} (${Math.round(text.length / 1024)} KiB) from ${file}\n`);
}
