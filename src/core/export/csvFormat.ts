/** Minimal CSV writing (RFC 4180 quoting, "\n" line ends, a final newline). */

/** Quote a field when it holds a comma, a double quote or a line break; inner quotes are doubled. */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** Join rows of already formatted cells into CSV text. */
export function csvText(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const lines = [header, ...rows].map((cells) => cells.map(csvField).join(','));
  return `${lines.join('\n')}\n`;
}

/** A number with exactly six decimals (fixed-point, so columns line up and bytes are stable). */
export function fixed6(value: number): string {
  return value.toFixed(6);
}
