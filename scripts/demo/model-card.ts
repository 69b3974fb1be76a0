/** Writes card.json beside a demo model: what it is, the invented data, measured accuracy, settings. */
import fs from 'node:fs';
import path from 'node:path';
import { MARKER_CLASSES } from './markers.ts';
import { SAMPLE_SEED, TRAIN_SEED, VALIDATION_SEED } from './demo-config.ts';
import type { Adversary } from './training.ts';
import type { Tally } from './evaluate.ts';

/** What train-models.ts measured for one model. */
export interface ModelReport {
  readonly heldOut: Tally;
  readonly samples: Tally;
  readonly robust: readonly { readonly eps: number; readonly tally: Tally }[];
}

/** The training run as the card records it. */
export interface TrainingRecord {
  readonly parameters: number;
  readonly trainImages: number;
  readonly standardEpochs: number;
  readonly hardenedEpochs: number;
  readonly settings: {
    readonly validationImages: number;
    readonly batchSize: number;
    readonly standardLearningRate: number;
    readonly hardenedLearningRate: number;
    readonly adversary: Adversary;
    readonly evalSteps: number;
  };
}

const DESCRIPTIONS = {
  standard: 'Small CNN classifying painted warehouse floor markers, trained on clean images only.',
  hardened:
    'The standard model fine-tuned by PGD L∞ adversarial training (Madry et al., ICLR 2018) at ε = 4/255, so it holds up better against small perturbations.',
} as const;

function round(value: number, digits = 4): number {
  const f = 10 ** digits;
  return Math.round(value * f) / f;
}

function tallyJson(t: Tally, extra: Record<string, unknown>): Record<string, unknown> {
  return { ...extra, correct: t.correct, total: t.total, accuracy: round(t.accuracy) };
}

/** Write dir/card.json for the model `name`. */
export function writeModelCard(dir: string, name: keyof typeof DESCRIPTIONS, report: ModelReport, run: TrainingRecord): void {
  const s = run.settings;
  const training: Record<string, unknown> = {
    framework: 'TensorFlow.js 4.22 (wasm backend, Node)',
    optimizer: 'Adam',
    batchSize: s.batchSize,
    trainImages: run.trainImages,
    trainSeed: TRAIN_SEED,
    standard: { epochs: run.standardEpochs, learningRate: s.standardLearningRate, loss: 'softmax cross-entropy on logits' },
  };
  if (name === 'hardened') {
    training['hardened'] = {
      startsFrom: 'the standard model',
      epochs: run.hardenedEpochs,
      learningRate: s.hardenedLearningRate,
      adversary: `PGD L∞, ε = ${round(s.adversary.eps * 255, 2)}/255, ${s.adversary.steps} steps of ${round(s.adversary.stepSize * 255, 3)}/255 from a random start; trained on the last iterate only`,
    };
  }
  const card = {
    name,
    description: DESCRIPTIONS[name],
    data: 'Invented: synthetic 32×32 RGB images drawn by scripts/demo/markers.ts (no real photographs, people, brands or products).',
    classes: MARKER_CLASSES,
    architecture: 'conv 16 3×3 relu → max-pool 2 → conv 32 3×3 relu → max-pool 2 → dense 64 relu → dense 6 (logits)',
    parameters: run.parameters,
    input: { height: 32, width: 32, channels: 3, layout: 'nhwc', range: '0,1' },
    output: 'logits',
    cleanAccuracy: {
      heldOut: tallyJson(report.heldOut, { seed: VALIDATION_SEED }),
      committedSamples: tallyJson(report.samples, { seed: SAMPLE_SEED }),
    },
    robustAccuracy: report.robust.map((r) =>
      tallyJson(r.tally, { attack: `PGD L∞, ${s.evalSteps} steps, random start`, eps: `${Math.round(r.eps * 255)}/255`, on: 'committed samples' }),
    ),
    training,
  };
  fs.writeFileSync(path.join(dir, 'card.json'), `${JSON.stringify(card, null, 2)}\n`);
}
