// The core runs in the page, in a Web Worker and in Node. It is type-checked without the DOM
// library (tsconfig.core.json) so that no DOM use can creep in; these are the few globals that
// all three platforms share, declared at the width the core actually uses.
declare global {
  class TextEncoder {
    encode(input?: string): Uint8Array;
  }
  class TextDecoder {
    constructor(label?: string, options?: { fatal?: boolean });
    decode(input?: ArrayBufferView | ArrayBuffer): string;
  }
  interface AbortSignal {
    readonly aborted: boolean;
    readonly reason: unknown;
    throwIfAborted(): void;
    addEventListener(type: 'abort', listener: () => void, options?: { once?: boolean }): void;
    removeEventListener(type: 'abort', listener: () => void): void;
  }
  const crypto: {
    subtle: { digest(algorithm: 'SHA-256', data: ArrayBuffer | ArrayBufferView): Promise<ArrayBuffer> };
    getRandomValues<T extends ArrayBufferView>(array: T): T;
  };
  const performance: { now(): number };
  const console: { log(...a: unknown[]): void; warn(...a: unknown[]): void; error(...a: unknown[]): void };
  function setTimeout(handler: () => void, ms?: number): unknown;
  function queueMicrotask(cb: () => void): void;
}
export {};
