/** Turns a decoded TensorProto (raw_data or typed fields) into a HostValue. */
import { OnnxLoadError } from './errors.ts';
import { DataType, type TensorProto } from './schema.ts';
import type { ElemType, HostValue } from './values.ts';
import type { Dim } from './symbolic.ts';

const TYPE_NAMES: Record<number, string> = {
  0: 'UNDEFINED', 1: 'FLOAT', 2: 'UINT8', 3: 'INT8', 4: 'UINT16', 5: 'INT16', 6: 'INT32', 7: 'INT64', 8: 'STRING',
  9: 'BOOL', 10: 'FLOAT16', 11: 'DOUBLE', 12: 'UINT32', 13: 'UINT64', 14: 'COMPLEX64', 15: 'COMPLEX128', 16: 'BFLOAT16',
};

/** Name of an ONNX element type for messages. */
export function dataTypeName(code: number): string {
  return TYPE_NAMES[code] ?? `type ${code}`;
}

/** The loader's element type for an ONNX data type, or undefined when Brink cannot run it. */
export function elemTypeOf(code: number): ElemType | undefined {
  if (code === DataType.FLOAT || code === DataType.DOUBLE || code === DataType.FLOAT16) return 'float32';
  if (code === DataType.INT64) return 'int64';
  if (code === DataType.INT32 || code === DataType.INT8 || code === DataType.UINT8 || code === 4 || code === 5) return 'int32';
  if (code === DataType.BOOL) return 'bool';
  return undefined;
}

/**
 * Decode a tensor's payload. `what` names it in errors, e.g. `initializer "conv1.weight"`.
 * Throws OnnxLoadError for external data, unsupported element types or a payload of the wrong size.
 */
export function decodeTensorData(t: TensorProto, what: string): HostValue {
  if (t.external) {
    const where = t.externalLocation !== undefined ? ` ("${t.externalLocation}")` : '';
    throw new OnnxLoadError(
      `ONNX ${what} keeps its data in an external file${where}; Brink reads a single .onnx file — save the model with all tensors inside it (onnx.save_model with save_as_external_data=False).`,
    );
  }
  const dtype = elemTypeOf(t.dataType);
  if (dtype === undefined) throw new OnnxLoadError(`ONNX ${what} has element type ${dataTypeName(t.dataType)}, which Brink does not run.`);
  const shape = t.dims.map((d) => {
    if (!Number.isSafeInteger(d) || d < 0) throw new OnnxLoadError(`ONNX ${what} has an invalid dimension ${d}.`);
    return d;
  });
  const count = shape.reduce((a, b) => a * b, 1);
  const data = t.rawData !== undefined ? decodeRaw(t.rawData, t.dataType) : typedField(t);
  if (data.length !== count) {
    throw new OnnxLoadError(`ONNX ${what} has ${data.length} values for shape [${shape.join(', ')}] (${count} expected); the file is damaged.`);
  }
  return { shape, dtype, data };
}

function typedField(t: TensorProto): ArrayLike<Dim> {
  if (t.dataType === DataType.FLOAT) return Float32Array.from(t.floatData);
  if (t.dataType === DataType.DOUBLE) return Float32Array.from(t.doubleData);
  if (t.dataType === DataType.INT64) return t.int64Data;
  // INT32, INT16, INT8, UINT8, BOOL and FLOAT16 (as raw bits) all use int32_data.
  if (t.dataType === DataType.FLOAT16) return Float32Array.from(t.int32Data, halfToFloat);
  return Int32Array.from(t.int32Data);
}

function decodeRaw(raw: Uint8Array, dataType: number): ArrayLike<Dim> {
  const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength);
  const per = bytesPerElement(dataType);
  if (raw.byteLength % per !== 0) throw new OnnxLoadError(`ONNX tensor raw_data of ${raw.byteLength} bytes is not a whole number of elements.`);
  const n = raw.byteLength / per;
  // raw_data is little-endian by definition (onnx.proto); DataView reads it so on any host.
  if (dataType === DataType.FLOAT) {
    // Fast path (a copy also fixes alignment): typed arrays use the host's order, little-endian in practice.
    if (HOST_IS_LITTLE_ENDIAN) return new Float32Array(raw.slice().buffer);
    return Float32Array.from({ length: n }, (_, i) => view.getFloat32(4 * i, true));
  }
  if (dataType === DataType.DOUBLE) return Float32Array.from({ length: n }, (_, i) => view.getFloat64(8 * i, true));
  if (dataType === DataType.FLOAT16) return Float32Array.from({ length: n }, (_, i) => halfToFloat(view.getUint16(2 * i, true)));
  if (dataType === DataType.INT64) {
    return Array.from({ length: n }, (_, i) => view.getInt32(8 * i + 4, true) * 4294967296 + view.getUint32(8 * i, true));
  }
  if (dataType === DataType.INT32) return Int32Array.from({ length: n }, (_, i) => view.getInt32(4 * i, true));
  if (dataType === 5) return Int32Array.from({ length: n }, (_, i) => view.getInt16(2 * i, true));
  if (dataType === 4) return Int32Array.from({ length: n }, (_, i) => view.getUint16(2 * i, true));
  if (dataType === DataType.INT8) return Int32Array.from({ length: n }, (_, i) => view.getInt8(i));
  return Int32Array.from({ length: n }, (_, i) => view.getUint8(i)); // UINT8, BOOL
}

const HOST_IS_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

function bytesPerElement(dataType: number): number {
  if (dataType === DataType.INT64 || dataType === DataType.DOUBLE) return 8;
  if (dataType === DataType.FLOAT || dataType === DataType.INT32) return 4;
  if (dataType === DataType.FLOAT16 || dataType === 4 || dataType === 5) return 2;
  return 1;
}

/** IEEE 754 half-precision bits → number. */
function halfToFloat(bits: number): number {
  const sign = bits & 0x8000 ? -1 : 1;
  const exponent = (bits >> 10) & 0x1f;
  const fraction = bits & 0x3ff;
  if (exponent === 0) return sign * 2 ** -14 * (fraction / 1024);
  if (exponent === 31) return fraction === 0 ? sign * Infinity : NaN;
  return sign * 2 ** (exponent - 15) * (1 + fraction / 1024);
}
