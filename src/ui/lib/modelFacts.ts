/** Pure helpers of the model description: shapes in words and the ONNX operator table. */

/** [null, 3, 16, 16] → "[any, 3, 16, 16]". */
export function shapeText(shape: readonly (number | null)[]): string {
  return `[${shape.map((d) => (d === null ? 'any' : String(d))).join(', ')}]`;
}

/** The op histogram as table rows: most frequent operator first, ties in alphabetical order. */
export function opRows(histogram: Readonly<Record<string, number>>): [string, number][] {
  return Object.entries(histogram).sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
}

/** Total number of graph nodes in an op histogram. */
export function nodeCount(histogram: Readonly<Record<string, number>>): number {
  return Object.values(histogram).reduce((a, b) => a + b, 0);
}
