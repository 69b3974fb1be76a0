/**
 * ONNX through the command line: `describe` shows the opset, the operator histogram and the detected
 * input; `sweep --model model.onnx` runs like a tfjs model. Fixture: test/fixtures/onnx (exported from
 * PyTorch by scripts/fixtures/onnx/export_fixtures.py; its op list is the PyTorch export's own).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

const TSX = path.resolve('node_modules/.bin/tsx');
const ONNX = path.resolve('test/fixtures/onnx/residual_bn_opset16.onnx');

function cli(args: readonly string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(TSX, ['src/cli/main.ts', ...args], { encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('ONNX models on the command line', () => {
  it('describe reports opset, operators and the NCHW input of a PyTorch export', () => {
    const r = cli(['describe', '--model', ONNX, '--json']);
    expect(r.code).toBe(0);
    const d = JSON.parse(r.stdout) as { format: string; layout: string; inputShape: (number | null)[]; numClasses: number; onnx: { opset: number; opHistogram: Record<string, number> } };
    expect(d.format).toBe('onnx');
    expect(d.inputShape).toEqual([null, 3, 16, 16]); // the export script's input: N×3×16×16
    expect(d.layout).toBe('nchw');
    expect(d.numClasses).toBe(10);
    expect(d.onnx.opset).toBe(16);
    // The residual block keeps its BatchNormalization nodes unfolded (export_fixtures.py).
    expect(d.onnx.opHistogram['BatchNormalization']).toBeGreaterThan(0);
    expect(d.onnx.opHistogram['GlobalAveragePool']).toBe(1);
    const text = cli(['describe', '--model', ONNX]);
    expect(text.stdout).toMatch(/onnx opset\s+16/);
    expect(text.stdout).toMatch(/BatchNormalization×\d/);
  });

  it('sweep --model model.onnx writes the curve; budgets never raise accuracy', () => {
    const out = mkdtempSync(path.join(tmpdir(), 'brink-onnx-'));
    // Demo images (RGB 32×32) are resized to the model's 16×16; labels 0..5 fit its 10 classes.
    const r = cli(['sweep', '--model', ONNX, '--samples', 'public/demo/samples', '--limit', '24', '--attack', 'fgsm,pgd', '--norm', 'l2', '--eps', '0,0.25,0.5', '--steps', '5', '--out', out]);
    expect(r.stderr).not.toContain('internal error');
    expect(r.code).toBe(0);
    const rows = readFileSync(path.join(out, 'curve.csv'), 'utf8').trimEnd().split('\n').slice(1).map((l) => l.split(','));
    expect(rows).toHaveLength(6);
    for (const attack of ['fgsm', 'pgd']) {
      const robust = rows.filter((x) => x[0] === attack).map((x) => Number(x[5]));
      expect(robust[0]).toBe(Number(rows.find((x) => x[0] === attack)![4])); // ε = 0: robust = clean-correct
      for (let i = 1; i < robust.length; i++) expect(robust[i]!).toBeLessThanOrEqual(robust[i - 1]!);
    }
  });

  it('an unsupported file gives a one-line message and exit 2', () => {
    const r = cli(['describe', '--model', path.resolve('test/fixtures/onnx/bad_control_flow.onnx')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/If|Loop|Scan/);
  });
});
