import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { nodeCount, opRows, shapeText } from '../../src/ui/lib/modelFacts.ts';

const DIR = path.resolve('test/fixtures/onnx');
const FILE = 'residual_bn_opset16.onnx';

describe('model description of an ONNX file', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });

  it('lists the operators the export recorded, most frequent first', async () => {
    // Reference: index.json, written by scripts/fixtures/onnx/export_fixtures.py from the onnx Python package's reading of the file.
    const index = JSON.parse(readFileSync(path.join(DIR, 'index.json'), 'utf8')) as { files: { file: string; opset: number; ops: Record<string, number> }[] };
    const recorded = index.files.find((f) => f.file === FILE)!;
    const model = await loadModelFromFiles([{ name: FILE, bytes: new Uint8Array(readFileSync(path.join(DIR, FILE))) }]);
    try {
      const onnx = model.description.onnx!;
      expect(onnx.opset).toBe(recorded.opset);
      const rows = opRows(onnx.opHistogram);
      expect(Object.fromEntries(rows)).toEqual(recorded.ops);
      expect(rows.every(([, n], i) => i === 0 || n <= rows[i - 1]![1])).toBe(true);
      expect(nodeCount(onnx.opHistogram)).toBe(Object.values(recorded.ops).reduce((a, b) => a + b, 0));
      // The export's input is [N, 3, 16, 16] with a free batch dimension.
      expect(shapeText(model.description.inputShape)).toBe('[any, 3, 16, 16]');
      expect(model.description.layout).toBe('nchw');
    } finally {
      model.dispose();
    }
  });

  it('breaks ties between operators alphabetically', () => {
    expect(opRows({ Relu: 2, Add: 2, Conv: 3 })).toEqual([
      ['Conv', 3],
      ['Add', 2],
      ['Relu', 2],
    ]);
  });
});
