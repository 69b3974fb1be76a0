/**
 * Thumbnails of flipped samples for saved runs and reports. During a sweep the collector keeps the
 * adversarial pixels of the first flips it sees (smallest budgets first, since the sweep runs budgets
 * in ascending order and drops a sample once flipped), a few per true class; afterwards they are
 * encoded as small PNGs beside the clean image.
 */
import type { AttackId } from '../attacks/types.ts';
import type { AdversarialBatch } from '../sweep/runSweep.ts';
import type { SampleRecord } from '../sweep/types.ts';
import { toBase64 } from './base64.ts';
import { encodePng, shrinkImage, type ImageSize } from './png.ts';
import type { FlipThumbnail } from './types.ts';

/** The adversarial point kept for one flipped sample. */
export interface KeptFlip {
  readonly attack: AttackId;
  readonly eps: number;
  readonly index: number;
  /** H·W·C values in [0,1]. */
  readonly adversarial: Float32Array;
}

export interface ThumbnailLimits {
  /** Flipped samples kept per attack (default 24). */
  readonly perAttack?: number;
  /** Flipped samples kept per attack and true class (default 3). */
  readonly perClass?: number;
  /** Longest side of a thumbnail in pixels; larger images are shrunk by box averaging (default 96). */
  readonly maxSide?: number;
}

const DEFAULT_LIMITS = { perAttack: 24, perClass: 3, maxSide: 96 } as const;

/** What the thumbnails need from the sample set. */
export interface ThumbnailSamples {
  readonly labels: Int32Array | readonly number[];
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly pixels: Float32Array;
}

/** Decides which flips to keep: the first ones offered, within the per-attack and per-class limits. */
class FlipSelection {
  private readonly perAttack = new Map<AttackId, number>();
  private readonly perClass = new Map<string, number>();
  private readonly seen = new Set<string>();

  constructor(
    private readonly labels: ThumbnailSamples['labels'],
    private readonly limits: Required<ThumbnailLimits>,
  ) {}

  /** Whether to keep this flip; counts it when kept. */
  take(attack: AttackId, index: number): boolean {
    const key = `${attack}|${index}`;
    const classKey = `${attack}|${this.labels[index] ?? -1}`;
    const forAttack = this.perAttack.get(attack) ?? 0;
    const forClass = this.perClass.get(classKey) ?? 0;
    if (this.seen.has(key) || forAttack >= this.limits.perAttack || forClass >= this.limits.perClass) return false;
    this.seen.add(key);
    this.perAttack.set(attack, forAttack + 1);
    this.perClass.set(classKey, forClass + 1);
    return true;
  }
}

function completeLimits(limits: ThumbnailLimits): Required<ThumbnailLimits> {
  return { ...DEFAULT_LIMITS, ...limits };
}

/**
 * A collector for runSweep's onAdversarial hook: keeps copies of the adversarial pixels of the first
 * flips of each attack, within the limits. `kept()` returns them in the order they were seen.
 */
export function createFlipCollector(samples: ThumbnailSamples, limits: ThumbnailLimits = {}): { onAdversarial: (batch: AdversarialBatch) => void; kept: () => KeptFlip[] } {
  const selection = new FlipSelection(samples.labels, completeLimits(limits));
  const size = samples.height * samples.width * samples.channels;
  const kept: KeptFlip[] = [];
  const onAdversarial = (batch: AdversarialBatch): void => {
    batch.indices.forEach((index, row) => {
      if (batch.flipped[row] !== 1 || !selection.take(batch.attack, index)) return;
      kept.push({ attack: batch.attack, eps: batch.eps, index, adversarial: batch.pixels.slice(row * size, (row + 1) * size) });
    });
  };
  return { onAdversarial, kept: () => [...kept] };
}

/**
 * Kept flips from a store of adversarial points per (attack, sample) — such as the workbench keeps
 * for its gallery — each at the sample's smallest flipping budget from the records.
 */
export function keptFlipsFrom(records: readonly SampleRecord[], adversarialOf: (attack: AttackId, index: number) => Float32Array | undefined): KeptFlip[] {
  const out: KeptFlip[] = [];
  for (const r of records) {
    for (const [attack, eps] of Object.entries(r.minFlipEps) as [AttackId, number | null][]) {
      const adversarial = typeof eps === 'number' && eps > 0 ? adversarialOf(attack, r.index) : undefined;
      if (adversarial !== undefined && typeof eps === 'number') out.push({ attack, eps, index: r.index, adversarial });
    }
  }
  return out;
}

/**
 * PNG thumbnails (clean and adversarial) of kept flips, with the sample's labels and predictions
 * from the records. Flips whose record or outcome is missing are skipped; the limits apply again,
 * so callers may pass every flip they hold.
 */
export function flipThumbnails(flips: readonly KeptFlip[], samples: ThumbnailSamples, records: readonly SampleRecord[], limits: ThumbnailLimits = {}): FlipThumbnail[] {
  const complete = completeLimits(limits);
  const selection = new FlipSelection(samples.labels, complete);
  const size: ImageSize = { height: samples.height, width: samples.width, channels: samples.channels };
  const n = size.height * size.width * size.channels;
  const byIndex = new Map(records.map((r) => [r.index, r]));
  const out: FlipThumbnail[] = [];
  for (const flip of [...flips].sort((a, b) => a.eps - b.eps || a.index - b.index)) {
    const record = byIndex.get(flip.index);
    const outcome = record?.outcomes.find((o) => o.attack === flip.attack && o.eps === flip.eps);
    if (record === undefined || outcome === undefined || !selection.take(flip.attack, flip.index)) continue;
    const original = samples.pixels.subarray(flip.index * n, (flip.index + 1) * n);
    out.push({
      attack: flip.attack,
      eps: flip.eps,
      index: flip.index,
      file: record.file,
      label: record.label,
      cleanPred: record.cleanPred,
      cleanConf: record.cleanConf,
      advPred: outcome.advPred,
      advConf: outcome.advConf,
      originalPng: pngBase64(original, size, complete.maxSide),
      adversarialPng: pngBase64(flip.adversarial, size, complete.maxSide),
    });
  }
  return out;
}

function pngBase64(pixels: Float32Array, size: ImageSize, maxSide: number): string {
  const small = shrinkImage(pixels, size, maxSide);
  return toBase64(encodePng(small.pixels, small.size));
}
