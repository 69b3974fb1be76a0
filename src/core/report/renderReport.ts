/**
 * The review report: one self-contained HTML document made from a saved run. Nothing in it loads
 * anything (inline CSS, inline SVG charts, thumbnails as data: URLs, a Content-Security-Policy
 * that forbids fetching), and it prints to a clean PDF.
 */
import type { SavedRun } from '../savedRun/types.ts';
import { html, raw, type Html } from './html.ts';
import { normName } from './format.ts';
import { reportContext } from './context.ts';
import { REPORT_CSS } from './styles.ts';
import { identificationSection, purposeSection, searchesSection, threatModelSection } from './sectionsSetup.ts';
import { curvesSection, flipMatrixSection, gallerySection, healthSection, perClassSection } from './sectionsResults.ts';
import { environmentSection, limitationsSection, reproduceSection } from './sectionsClosing.ts';

export interface ReportOptions {
  /** Heading of the report (default: "Robustness evaluation"). */
  readonly title?: string;
  /** Replaces the default first paragraph of "Purpose and scope". */
  readonly purpose?: string;
  /** ISO time printed as the report's date; left out when not given (so the same run gives the same bytes). */
  readonly generatedAt?: string;
  /** Flipped samples shown in the gallery excerpt (default 12). */
  readonly galleryLimit?: number;
}

/** Allows only inline styles and data: images; nothing can be fetched (favicon included). */
const CONTENT_POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:";

/** The report as HTML text. User-provided strings (file and class names, title, purpose) are escaped. */
export function renderReport(saved: SavedRun, options: ReportOptions = {}): string {
  const c = reportContext(saved);
  const title = options.title ?? 'Robustness evaluation';
  const modelName = saved.run.model.files.find((f) => /\.(json|onnx)$/i.test(f.name))?.name ?? 'model';
  const body: Html[] = [
    purposeSection(c, options.purpose),
    identificationSection(c),
    threatModelSection(c),
    searchesSection(c),
    curvesSection(c),
    perClassSection(c),
    flipMatrixSection(c),
    healthSection(c),
    gallerySection(c, options.galleryLimit ?? 12),
    limitationsSection(c),
    reproduceSection(c),
    environmentSection(c),
  ];
  const doc = html`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${raw(CONTENT_POLICY)}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="icon" href="data:,">
<title>${title} — ${modelName}</title>
<style>${raw(REPORT_CSS)}</style>
</head>
<body>
<main>
<header class="cover">
<h1>${title}</h1>
<p>Model <span class="mono">${modelName}</span> (SHA-256 <span class="hash">${saved.run.model.sha256.slice(0, 16)}…</span>) · ${saved.run.samples.count} samples · ${normName(saved.run.config.norm)} threat model</p>
${options.generatedAt !== undefined ? html`<p>Report generated ${options.generatedAt} by Brink ${saved.run.brinkVersion}.</p>` : html`<p>Report by Brink ${saved.run.brinkVersion}.</p>`}
</header>
${body}
<footer>Made with Brink from the saved run of ${saved.savedAt}. Every number in this document comes from that file; the run's curve.csv holds the same curve.</footer>
</main>
</body>
</html>
`;
  return doc.text;
}
