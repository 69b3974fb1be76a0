/**
 * The budget editor's language: a list of budgets in pixel units separated by commas or spaces,
 * each a decimal number (0.03), a fraction of grey levels (8/255), or a range start:stop:step
 * (0:8/255:2/255, both ends included).
 */

/** Parsed budgets, ascending, or the first problem found. */
export type BudgetParse = { readonly ok: true; readonly values: number[] } | { readonly ok: false; readonly error: string };

/** Ranges longer than this are almost certainly a typo (a step too small). */
export const MAX_BUDGETS = 64;

/** Relative slack for "the stop is reached" in ranges (0:0.3:0.1 must include 0.3 despite rounding). */
const RANGE_SLACK = 1e-9;

/** One number: a decimal, or a/b with decimals a and b. */
export function parseBudgetValue(text: string): number | null {
  const t = text.trim();
  const decimal = /^[+]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i;
  const slash = t.indexOf('/');
  if (slash < 0) return decimal.test(t) ? Number(t) : null;
  const top = t.slice(0, slash).trim();
  const bottom = t.slice(slash + 1).trim();
  if (!decimal.test(top) || !decimal.test(bottom)) return null;
  const denominator = Number(bottom);
  return denominator > 0 ? Number(top) / denominator : null;
}

function expandRange(token: string): number[] | string {
  const parts = token.split(':');
  if (parts.length !== 3) return `“${token}” is not a range: write start:stop:step, e.g. 0:8/255:2/255.`;
  const [start, stop, step] = parts.map(parseBudgetValue);
  if (start == null || stop == null || step == null) return `“${token}”: each part of a range must be a number or a fraction like 2/255.`;
  if (step <= 0) return `“${token}”: the step must be greater than 0.`;
  if (stop < start) return `“${token}”: the stop is smaller than the start.`;
  const count = Math.floor((stop - start) / step + RANGE_SLACK) + 1;
  if (count > MAX_BUDGETS) return `“${token}” gives ${count} budgets; at most ${MAX_BUDGETS} are allowed.`;
  // start + i·step, not a running sum, so rounding does not pile up along the range.
  return Array.from({ length: count }, (_, i) => start + i * step);
}

/**
 * Parse the editor's text. Budgets must be ≥ 0 (and ≤ 1 for L∞, where a larger budget cannot do
 * more than 1); duplicates are an error, the result is sorted ascending.
 */
export function parseBudgets(text: string, norm: 'linf' | 'l2'): BudgetParse {
  const tokens = text.split(/[\s,;]+/).filter((t) => t !== '');
  if (tokens.length === 0) return { ok: false, error: 'Give at least one budget, e.g. 0, 2/255, 4/255, 8/255.' };
  const values: number[] = [];
  for (const token of tokens) {
    if (token.includes(':')) {
      const range = expandRange(token);
      if (typeof range === 'string') return { ok: false, error: range };
      values.push(...range);
      continue;
    }
    const value = parseBudgetValue(token);
    if (value === null) return { ok: false, error: `“${token}” is not a number or a fraction like 8/255.` };
    values.push(value);
  }
  for (const v of values) {
    if (!Number.isFinite(v)) return { ok: false, error: 'Every budget must be a finite number.' };
    if (norm === 'linf' && v > 1) return { ok: false, error: `${formatEps(v)} is above 1, the whole pixel range; L∞ budgets lie between 0 and 1.` };
  }
  if (values.length > MAX_BUDGETS) return { ok: false, error: `${values.length} budgets; at most ${MAX_BUDGETS} are allowed.` };
  const sorted = [...values].sort((a, b) => a - b);
  for (let i = 1; i < sorted.length; i++) {
    if (sorted[i] === sorted[i - 1]) return { ok: false, error: `The budget ${formatEps(sorted[i]!)} is listed twice.` };
  }
  return { ok: true, values: sorted };
}

/** A budget in pixel units, to four significant digits (0 stays "0"). */
export function formatEps(eps: number): string {
  if (eps === 0) return '0';
  return Number(eps.toPrecision(4)).toString();
}

/** The same budget in grey levels of an 8-bit image: "8/255", "2.5/255". */
export function greyLevels(eps: number): string {
  const k = eps * 255;
  const rounded = Math.round(k * 100) / 100;
  return `${Number(rounded.toFixed(2)).toString()}/255`;
}

/** "0.03137 (8/255)": how the workbench shows every budget. */
export function describeEps(eps: number): string {
  return `${formatEps(eps)} (${greyLevels(eps)})`;
}

/** The budgets written back as editor text in grey levels when they are whole levels, else as decimals. */
export function budgetsToText(values: readonly number[]): string {
  return values
    .map((v) => {
      const k = v * 255;
      return Math.abs(k - Math.round(k)) < 1e-9 ? (v === 0 ? '0' : `${Math.round(k)}/255`) : String(v);
    })
    .join(', ');
}
