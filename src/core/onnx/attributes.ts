/** Typed access to a node's attributes, with ONNX defaults and errors naming the attribute. */
import { AttributeType, type AttributeProto, type TensorProto } from './schema.ts';

const utf8 = new TextDecoder('utf-8');

/** Read-only view of one node's attributes. `fail` raises a node error. */
export class Attributes {
  private readonly byName = new Map<string, AttributeProto>();

  constructor(
    list: readonly AttributeProto[],
    private readonly fail: (message: string) => never,
  ) {
    for (const a of list) this.byName.set(a.name, a);
  }

  has(name: string): boolean {
    return this.byName.has(name);
  }

  int(name: string, fallback: number): number {
    const a = this.get(name, AttributeType.INT);
    return a === undefined ? fallback : (a.i ?? 0);
  }

  ints(name: string, fallback: readonly number[]): number[] {
    const a = this.get(name, AttributeType.INTS);
    return a === undefined ? [...fallback] : [...a.ints];
  }

  /** An INTS attribute that may be absent (undefined) — e.g. axes whose default depends on rank. */
  optionalInts(name: string): number[] | undefined {
    const a = this.get(name, AttributeType.INTS);
    return a === undefined ? undefined : [...a.ints];
  }

  float(name: string, fallback: number): number {
    const a = this.get(name, AttributeType.FLOAT);
    return a === undefined ? fallback : (a.f ?? 0);
  }

  floats(name: string): number[] | undefined {
    const a = this.get(name, AttributeType.FLOATS);
    return a === undefined ? undefined : [...a.floats];
  }

  string(name: string, fallback: string): string {
    const a = this.get(name, AttributeType.STRING);
    return a === undefined || a.s === undefined ? fallback : utf8.decode(a.s);
  }

  tensor(name: string): TensorProto | undefined {
    return this.get(name, AttributeType.TENSOR)?.t;
  }

  private get(name: string, type: number): AttributeProto | undefined {
    const a = this.byName.get(name);
    if (a === undefined) return undefined;
    // type is 0 only in files from before IR version 2; trust the field that is set then.
    if (a.type !== 0 && a.type !== type) this.fail(`attribute "${name}" has type ${a.type}, expected ${type}`);
    return a;
  }
}
