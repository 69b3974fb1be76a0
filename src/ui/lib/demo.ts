/**
 * The demo workspace shipped under public/demo/: two models of an invented warehouse floor-marker
 * reader (a standard one and an adversarially trained one) and labelled sample images. Everything
 * is fetched from the app's own origin and handed to the worker like dropped files.
 */
import type { NamedBytes } from '../../core/types.ts';
import { parseManifest } from '../../core/samples/manifest.ts';
import type { DemoModelId } from '../store/state.ts';

export const DEMO_MODEL_LABELS: Readonly<Record<DemoModelId, string>> = {
  standard: 'Demo: floor-marker reader, standard training',
  hardened: 'Demo: floor-marker reader, adversarially trained',
};

const DEMO_SAMPLES_LABEL = 'Demo: floor-marker images';

/** A URL inside the app (works under any base path). */
export function appUrl(path: string): string {
  return new URL(path, document.baseURI).href;
}

async function fetchBytes(path: string): Promise<Uint8Array> {
  const response = await fetch(appUrl(path));
  if (!response.ok) throw new Error(`Could not read ${path} (HTTP ${response.status}).`);
  return new Uint8Array(await response.arrayBuffer());
}

/** Fetch with a few requests in flight at a time. */
async function fetchAll(paths: readonly string[], folder: string, limit = 12): Promise<NamedBytes[]> {
  const out = new Array<NamedBytes>(paths.length);
  let next = 0;
  const lane = async (): Promise<void> => {
    while (next < paths.length) {
      const i = next++;
      out[i] = { name: paths[i]!, bytes: await fetchBytes(`${folder}${paths[i]!}`) };
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, paths.length) }, lane));
  return out;
}

/** The weight shard paths a model.json lists. */
export function shardPaths(modelJson: unknown): string[] {
  const manifest = (modelJson as { weightsManifest?: { paths?: unknown }[] }).weightsManifest ?? [];
  return manifest.flatMap((group) => (Array.isArray(group.paths) ? group.paths.filter((p): p is string => typeof p === 'string') : []));
}

/** model.json and its shards, plus the model card (plain data) of a demo model. */
export async function fetchDemoModel(id: DemoModelId): Promise<{ files: NamedBytes[]; card: Record<string, unknown> | null; label: string }> {
  const folder = `demo/models/${id}/`;
  const modelJson = await fetchBytes(`${folder}model.json`);
  const shards = await fetchAll(shardPaths(JSON.parse(new TextDecoder().decode(modelJson))), folder);
  // The card only describes the model; without it the model still loads.
  const card = await fetchBytes(`${folder}card.json`).then(
    (bytes) => JSON.parse(new TextDecoder().decode(bytes)) as Record<string, unknown>,
    () => null,
  );
  return { files: [{ name: 'model.json', bytes: modelJson }, ...shards], card, label: DEMO_MODEL_LABELS[id] };
}

/** The demo manifest, the images it lists and the class names, named as the CLI names them. */
export async function fetchDemoSamples(): Promise<{ files: NamedBytes[]; label: string }> {
  const folder = 'demo/samples/';
  const manifest: NamedBytes = { name: 'manifest.csv', bytes: await fetchBytes(`${folder}manifest.csv`) };
  const images = await fetchAll(
    parseManifest(manifest).map((e) => e.relative),
    folder,
  );
  const classes: NamedBytes = { name: 'classes.txt', bytes: await fetchBytes(`${folder}classes.txt`) };
  return { files: [manifest, ...images, classes], label: DEMO_SAMPLES_LABEL };
}
