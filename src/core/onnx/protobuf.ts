/**
 * A small reader for the protocol-buffer wire format (the encoding of .onnx files): varints
 * (64-bit included), length-delimited fields, fixed32/fixed64 and packed repeated scalars.
 * It knows nothing about ONNX; schema.ts maps field numbers to meaning.
 */

/** Wire types of the protobuf encoding. Groups (3, 4) are obsolete and rejected. */
export const WireType = { varint: 0, fixed64: 1, lengthDelimited: 2, fixed32: 5 } as const;

/** Thrown for bytes that are not a well-formed protobuf message (truncated, bad tag, bad length). */
export class ProtobufError extends Error {
  constructor(
    message: string,
    readonly offset: number,
  ) {
    super(`${message} at byte ${offset}`);
    this.name = 'ProtobufError';
  }
}

/** One field's key: its number and how its value is encoded. */
export interface FieldKey {
  readonly field: number;
  readonly wireType: number;
}

const TWO_POW_32 = 4294967296;
const utf8 = new TextDecoder('utf-8');

/** Sequential reader over one message (or sub-message) of a byte array. */
export class ProtoReader {
  private pos: number;
  private readonly view: DataView;

  constructor(
    private readonly bytes: Uint8Array,
    start = 0,
    private readonly end = bytes.length,
  ) {
    this.pos = start;
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }

  /** Current byte offset (into the whole buffer), for error messages. */
  get offset(): number {
    return this.pos;
  }

  /** True while there are fields left in this message. */
  hasMore(): boolean {
    return this.pos < this.end;
  }

  /** Read the next field key. */
  readKey(): FieldKey {
    const at = this.pos;
    const key = this.readVarint();
    const field = Math.floor(key / 8);
    const wireType = key % 8;
    if (field < 1) throw new ProtobufError('invalid field number 0', at);
    if (wireType === 3 || wireType === 4 || wireType > 5) throw new ProtobufError(`unsupported wire type ${wireType}`, at);
    return { field, wireType };
  }

  /**
   * Read a varint as a signed 64-bit integer (two's complement, as int64/int32 fields are stored),
   * returned as a JS number: exact up to 2^53, rounded beyond (e.g. INT64_MAX used as "to the end").
   */
  readVarint(): number {
    let low = 0;
    let high = 0;
    let shift = 0;
    for (let i = 0; i < 10; i++) {
      const b = this.readByte();
      const bits = b & 0x7f;
      if (shift < 28) low |= bits << shift;
      else if (shift === 28) {
        low |= (bits & 0x0f) << 28;
        high |= bits >>> 4;
      } else high |= bits << (shift - 32);
      if (b < 0x80) return (high | 0) * TWO_POW_32 + (low >>> 0);
      shift += 7;
    }
    throw new ProtobufError('varint longer than 10 bytes', this.pos);
  }

  /** Read a length-delimited field as a view (no copy) of its bytes. */
  readBytes(): Uint8Array {
    const [start, stop] = this.readLengthDelimited();
    return this.bytes.subarray(start, stop);
  }

  /** Read a length-delimited field as UTF-8 text. */
  readString(): string {
    return utf8.decode(this.readBytes());
  }

  /** Read a length-delimited field as a nested message reader. */
  readMessage(): ProtoReader {
    const [start, stop] = this.readLengthDelimited();
    return new ProtoReader(this.bytes, start, stop);
  }

  /** Read a fixed32 field as a little-endian float. */
  readFloat(): number {
    const at = this.take(4);
    return this.view.getFloat32(at, true);
  }

  /** Read a fixed64 field as a little-endian double. */
  readDouble(): number {
    const at = this.take(8);
    return this.view.getFloat64(at, true);
  }

  /** Skip a field's value of the given wire type. */
  skip(wireType: number): void {
    if (wireType === WireType.varint) this.readVarint();
    else if (wireType === WireType.fixed64) this.take(8);
    else if (wireType === WireType.fixed32) this.take(4);
    else if (wireType === WireType.lengthDelimited) this.readLengthDelimited();
    else throw new ProtobufError(`unsupported wire type ${wireType}`, this.pos);
  }

  /** Append one or more varint values: packed (length-delimited) or a single unpacked value. */
  readRepeatedVarint(wireType: number, into: number[]): void {
    if (wireType === WireType.varint) {
      into.push(this.readVarint());
      return;
    }
    this.expectWireType(wireType, WireType.lengthDelimited);
    const inner = this.readMessage();
    while (inner.hasMore()) into.push(inner.readVarint());
  }

  /** Append one or more float values: packed or a single fixed32. */
  readRepeatedFloat(wireType: number, into: number[]): void {
    if (wireType === WireType.fixed32) {
      into.push(this.readFloat());
      return;
    }
    this.expectWireType(wireType, WireType.lengthDelimited);
    const inner = this.readMessage();
    while (inner.hasMore()) into.push(inner.readFloat());
  }

  /** Append one or more double values: packed or a single fixed64. */
  readRepeatedDouble(wireType: number, into: number[]): void {
    if (wireType === WireType.fixed64) {
      into.push(this.readDouble());
      return;
    }
    this.expectWireType(wireType, WireType.lengthDelimited);
    const inner = this.readMessage();
    while (inner.hasMore()) into.push(inner.readDouble());
  }

  /** Fail unless a field has the wire type its schema says. */
  expectWireType(actual: number, expected: number): void {
    if (actual !== expected) throw new ProtobufError(`wire type ${actual} where ${expected} was expected`, this.pos);
  }

  private readLengthDelimited(): [number, number] {
    const at = this.pos;
    const length = this.readVarint();
    if (length < 0 || this.pos + length > this.end) {
      throw new ProtobufError(`length ${length} runs past the end of the message (truncated file?)`, at);
    }
    const start = this.pos;
    this.pos += length;
    return [start, this.pos];
  }

  private readByte(): number {
    if (this.pos >= this.end) throw new ProtobufError('unexpected end of data (truncated file?)', this.pos);
    return this.bytes[this.pos++]!;
  }

  /** Advance over n bytes and return the offset of the first (offsets index `bytes` and the view alike). */
  private take(n: number): number {
    if (this.pos + n > this.end) throw new ProtobufError('unexpected end of data (truncated file?)', this.pos);
    const at = this.pos;
    this.pos += n;
    return at;
  }
}
