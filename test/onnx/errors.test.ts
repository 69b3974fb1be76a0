/**
 * Every documented load error of the ONNX loader (src/core/onnx/README.md, "Errors"), on small
 * broken files written with the onnx Python package (scripts/fixtures/onnx/handmade.py) or cut
 * from a valid fixture here. Each message must name what is wrong; node errors name the node,
 * its op type and the opset.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { OnnxLoadError } from '../../src/core/onnx/errors.ts';
import { readFixture, seededInputs } from './fixtures.ts';

async function loadError(bytes: Uint8Array, name = 'model.onnx'): Promise<OnnxLoadError> {
  try {
    const model = await loadOnnxModel({ name, bytes });
    model.dispose();
  } catch (err) {
    if (err instanceof OnnxLoadError) return err;
    throw new Error(`expected an OnnxLoadError, got ${String(err)}`);
  }
  throw new Error('the file loaded without error');
}

describe('ONNX load errors', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });

  it('names an unsupported operator, its node and the opset', async () => {
    const err = await loadError(readFixture('bad_unsupported_op.onnx').bytes);
    expect(err.message).toMatch(/^ONNX node "mystery_einsum" \(Einsum, opset 12\): operator Einsum is not supported/);
  });

  it('names an operator from another domain', async () => {
    const err = await loadError(readFixture('bad_custom_domain.onnx').bytes);
    expect(err.message).toMatch(/^ONNX node "vendor_gelu" \(FusedGelu, opset 13\): operator FusedGelu of domain "com.example" is not supported/);
  });

  it('refuses weights kept in an external data file, naming the tensor and the file', async () => {
    const err = await loadError(readFixture('bad_external_data.onnx').bytes);
    expect(err.message).toMatch(/^ONNX initializer "w" keeps its data in an external file \("weights.bin"\)/);
  });

  it('refuses control flow, naming the If node (not the ops before it)', async () => {
    const err = await loadError(readFixture('bad_control_flow.onnx').bytes);
    expect(err.message).toMatch(/^ONNX node "branch_on_peak" \(If, opset 13\): control flow \(If, Loop, Scan\) is not supported/);
  });

  it('says when a shape depends on the pixels and cannot be resolved at load time', async () => {
    const err = await loadError(readFixture('bad_dynamic_shape.onnx').bytes);
    expect(err.message).toMatch(
      /^ONNX node "reshape_by_pixels" \(Reshape, opset 13\): the shape cannot be resolved when loading: the target shape \(input 1, "shape"\) is computed from the image at run time/,
    );
  });

  it('refuses a free image dimension', async () => {
    const err = await loadError(readFixture('bad_free_dim.onnx').bytes);
    expect(err.message).toMatch(/^The ONNX input "input" has a free dimension at position 2 \("height"\)/);
  });

  it('reports a truncated file as malformed protobuf, at every cut point tried', async () => {
    const bytes = readFixture('plain_cnn_opset11.onnx').bytes;
    for (const fraction of [0.1, 0.5, 0.9, 0.999]) {
      const err = await loadError(bytes.slice(0, Math.floor(bytes.length * fraction)), 'cut.onnx');
      expect(err.message).toMatch(/^Not a readable ONNX file "cut.onnx": (malformed protobuf|it holds no graph)/);
    }
  });

  it('reports bytes that are not protobuf at all', async () => {
    const garbage = await loadError(new Uint8Array([0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff]), 'x.onnx');
    expect(garbage.message).toMatch(/^Not a readable ONNX file "x.onnx": malformed protobuf \(varint longer than 10 bytes/);
    const png = await loadError(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), 'image.png');
    expect(png.message).toMatch(/^Not a readable ONNX file "image.png": malformed protobuf/);
    const empty = await loadError(new Uint8Array(0), 'empty.onnx');
    expect(empty.message).toBe('Not a readable ONNX file "empty.onnx": it holds no graph; the file is truncated or is not an ONNX model.');
  });

  it('never fails with anything but OnnxLoadError on damaged copies of a valid file', async () => {
    // Seeded byte damage (common practice for parsers): each copy must load or be refused cleanly.
    const original = readFixture('view_flatten_opset11.onnx').bytes;
    const draws = seededInputs(3 * 200, 99);
    let refused = 0;
    for (let k = 0; k < 200; k++) {
      const bytes = original.slice();
      const at = Math.floor(draws[3 * k]! * bytes.length);
      bytes[at] = Math.floor(draws[3 * k + 1]! * 256);
      const cut = draws[3 * k + 2]! < 0.2 ? Math.floor(draws[3 * k + 2]! * 5 * bytes.length) : bytes.length;
      try {
        (await loadOnnxModel({ name: 'damaged.onnx', bytes: bytes.slice(0, cut) })).dispose();
      } catch (err) {
        if (!(err instanceof OnnxLoadError)) throw err;
        refused++;
      }
    }
    console.log(`damaged copies refused: ${refused} of 200`);
    expect(refused).toBeGreaterThan(0);
  });
});
