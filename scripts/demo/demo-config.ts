/** Seeds and sizes shared by the demo data generator, the training script and the asset test. */

/** Stream of training images (fresh images every epoch come from forks of it). */
export const TRAIN_SEED = 101;
/** Held-out images used to measure clean accuracy while training; never trained on. */
export const VALIDATION_SEED = 202;
/** Held-out images saved as the committed PNG samples; never trained on. */
export const SAMPLE_SEED = 303;
/** Committed samples per class (6 classes → 204 images). */
export const SAMPLES_PER_CLASS = 34;

/** Folders of the committed assets, relative to the repository root. */
export const SAMPLES_DIR = 'public/demo/samples';
export const MODELS_DIR = 'public/demo/models';
