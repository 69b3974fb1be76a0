/**
 * The hand-written protobuf reader and ONNX schema decoder. Wire-format cases follow the protobuf
 * encoding guide (from memory: 150 encodes as 96 01; int64 −1 as nine 0xff bytes and 01; floats as
 * little-endian IEEE 754 fixed32). What the decoder reads from real files is checked against the
 * onnx Python package's reading of the same files (op histograms, opset, producer in index.json).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { ProtoReader, ProtobufError } from '../../src/core/onnx/protobuf.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { fixtureIndex, readFixture } from './fixtures.ts';

const reader = (...bytes: number[]): ProtoReader => new ProtoReader(new Uint8Array(bytes));

describe('protobuf wire format', () => {
  it('reads varints, including negative and large 64-bit values', () => {
    expect(reader(0x96, 0x01).readVarint()).toBe(150); // source: protobuf encoding guide
    expect(reader(0x00).readVarint()).toBe(0);
    expect(reader(0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0x01).readVarint()).toBe(-1); // two's complement, 10 bytes
    expect(reader(0xfe, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0x01).readVarint()).toBe(-2);
    expect(reader(0x80, 0x80, 0x80, 0x80, 0x10).readVarint()).toBe(2 ** 32); // bit 32 set: 0x10 << 28
    expect(reader(0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x10).readVarint()).toBe(2 ** 53);
    // INT64_MAX (exporters' "to the end" in Slice) rounds to the nearest double, 2^63.
    expect(reader(0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0x7f).readVarint()).toBe(2 ** 63);
  });

  it('reads keys, fixed32/fixed64 and packed and unpacked repeated fields', () => {
    const key = reader(0x08).readKey(); // field 1, varint
    expect(key).toEqual({ field: 1, wireType: 0 });
    expect(reader(0x00, 0x00, 0xc0, 0x3f).readFloat()).toBe(1.5); // IEEE 754 single 0x3fc00000
    expect(reader(0x00, 0x00, 0x00, 0x00, 0x00, 0x00, 0xf8, 0x3f).readDouble()).toBe(1.5); // 0x3ff8000000000000
    const packed: number[] = [];
    reader(0x03, 0x01, 0x96, 0x01).readRepeatedVarint(2, packed); // length 3: 1, 150
    expect(packed).toEqual([1, 150]);
    const unpacked: number[] = [];
    reader(0x05).readRepeatedVarint(0, unpacked);
    expect(unpacked).toEqual([5]);
    const floats: number[] = [];
    reader(0x08, 0x00, 0x00, 0xc0, 0x3f, 0x00, 0x00, 0x80, 0xbf).readRepeatedFloat(2, floats);
    expect(floats).toEqual([1.5, -1]);
    const r = reader(0x0a, 0x02, 0x68, 0x69, 0x10, 0x07); // field 1 string "hi", field 2 varint 7
    expect(r.readKey().field).toBe(1);
    expect(r.readString()).toBe('hi');
    r.readKey();
    r.skip(0);
    expect(r.hasMore()).toBe(false);
  });

  it('fails with the offset on truncated or invalid data', () => {
    expect(() => reader(0x96).readVarint()).toThrow(ProtobufError);
    expect(() => reader(0x05, 0x61).readBytes()).toThrow(/length 5 runs past the end of the message \(truncated file\?\) at byte 0/);
    expect(() => reader(0x0b).readKey()).toThrow(/unsupported wire type 3 at byte 0/);
    expect(() => reader(0x00, 0x00).readFloat()).toThrow(/unexpected end of data/);
  });
});

describe('ONNX details against the onnx Python package', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });

  for (const fixture of fixtureIndex().files) {
    it(fixture.file, async () => {
      const model = await loadOnnxModel(readFixture(fixture.file));
      try {
        const details = model.description.onnx!;
        expect(details.opHistogram).toEqual(fixture.ops); // source: onnx.load(...).graph.node
        expect(details.opset).toBe(fixture.opset); // source: onnx opset_import
        expect(details.producer).toBe(fixture.producer);
        expect(details.inputName).toBe('input');
        expect(details.outputName).toBe('output');
        expect(model.description.numClasses).toBe(10);
      } finally {
        model.dispose();
      }
    });
  }
});
