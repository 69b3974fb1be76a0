/** Progress lines on stderr, at most one every half second (plain lines, friendly to CI logs). */
import type { SweepProgress } from '../core/sweep/types.ts';

/** A progress callback that prints "pgd ε=0.031: 40 % (1200/3000 gradient evaluations, 850/s, ~2 s left)". */
export function stderrProgress(intervalMs = 500): (p: SweepProgress) => void {
  let last = 0;
  return (p) => {
    const now = Date.now();
    if (now - last < intervalMs && p.done < p.total) return;
    last = now;
    const share = p.total > 0 ? (100 * p.done) / p.total : 100;
    const left = p.rate > 0 ? Math.max(0, (p.total - p.done) / p.rate) : Number.NaN;
    const leftText = Number.isFinite(left) ? `, ~${Math.ceil(left)} s left` : '';
    process.stderr.write(`brink: ${p.attack} eps=${p.eps}: ${share.toFixed(0)} % (${p.done}/${p.total} gradient evaluations, ${p.rate.toFixed(0)}/s${leftText})\n`);
  };
}
