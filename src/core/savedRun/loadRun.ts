/**
 * Reading a saved run back: parse, check the format name and version, then every field the
 * workbench, the report, the comparison and the gate rely on. Errors are SavedRunError with a
 * message naming the first bad field.
 */
import { attackIds, isAttackId } from '../attacks/registry.ts';
import type { AttackId } from '../attacks/types.ts';
import { isBase64 } from './base64.ts';
import { RESIZE_MODES } from '../samples/crop.ts';
import {
  SavedRunError, at, booleanAt, choiceAt, eachAt, fail, listAt, numberAt, numberListAt, objectAt, stringAt, stringListAt, type Json,
} from './fields.ts';
import { SAVED_RUN_FORMAT, SAVED_RUN_VERSION, type SavedRun } from './types.ts';

export { SavedRunError } from './fields.ts';

const NORMS = ['linf', 'l2'] as const;

/** Parse and check a saved run (text or UTF-8 bytes). Throws SavedRunError naming the problem. */
export function loadRun(input: string | Uint8Array): SavedRun {
  const text = typeof input === 'string' ? input : new TextDecoder('utf-8').decode(input);
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (err) {
    throw new SavedRunError(`not JSON (${err instanceof Error ? err.message : String(err)})`);
  }
  const top = objectAt(parsed, 'the file');
  checkFormat(top);
  checkTop(top);
  return top as unknown as SavedRun;
}

function checkFormat(top: Json): void {
  const format = top['format'];
  if (format === 'brink-run') throw new SavedRunError(`this is a run record (run.json), not a saved run: use the ${SAVED_RUN_FORMAT} file (run.brink.json) written beside it`);
  if (format !== SAVED_RUN_FORMAT) throw new SavedRunError(`not a Brink saved run (format is ${JSON.stringify(format) ?? 'missing'}, expected "${SAVED_RUN_FORMAT}")`);
  const version = top['formatVersion'];
  if (typeof version !== 'number') fail('formatVersion', 'a number', version);
  if (version > SAVED_RUN_VERSION) throw new SavedRunError(`saved-run format version ${version} is newer than this Brink reads (version ${SAVED_RUN_VERSION}); update Brink`);
  if (version !== SAVED_RUN_VERSION) throw new SavedRunError(`saved-run format version ${version} is not supported (this Brink reads version ${SAVED_RUN_VERSION})`);
}

function checkTop(top: Json): void {
  choiceAt(top, 'origin', '', ['cli', 'workbench']);
  stringAt(top, 'savedAt', '');
  const size = objectAt(top['imageSize'], 'imageSize');
  for (const key of ['height', 'width', 'channels']) numberAt(size, key, 'imageSize');
  const run = objectAt(top['run'], 'run');
  const curveLength = checkRun(run);
  eachAt(top, 'records', '', (r, p) => checkRecord(r, p, curveLength));
  eachAt(top, 'flips', '', checkFlip);
  if (top['health'] !== undefined) eachAt(top, 'health', '', checkHealth);
}

/** Checks the run record; returns the number of curve points. */
function checkRun(run: Json): number {
  for (const key of ['brinkVersion', 'tfjsVersion', 'startedAt', 'endedAt']) stringAt(run, key, 'run');
  booleanAt(run, 'complete', 'run');
  numberAt(run, 'seed', 'run');
  stringAt(objectAt(run['backend'], 'run.backend'), 'name', 'run.backend');
  if (run['commandLine'] !== undefined) stringListAt(run, 'commandLine', 'run');
  const model = objectAt(run['model'], 'run.model');
  stringAt(model, 'sha256', 'run.model');
  eachAt(model, 'files', 'run.model', (f, p) => [stringAt(f, 'name', p), stringAt(f, 'sha256', p)]);
  if (model['description'] !== undefined) objectAt(model['description'], 'run.model.description');
  const samples = objectAt(run['samples'], 'run.samples');
  stringAt(samples, 'sha256', 'run.samples');
  for (const key of ['files', 'count', 'cleanCorrect', 'cleanAccuracy']) numberAt(samples, key, 'run.samples');
  if (samples['classNames'] !== undefined) stringListAt(samples, 'classNames', 'run.samples');
  if (samples['resize'] !== undefined) choiceAt(samples, 'resize', 'run.samples', RESIZE_MODES);
  const pre = objectAt(run['preprocessing'], 'run.preprocessing');
  choiceAt(pre, 'inputRange', 'run.preprocessing', ['0,1', '0,255', '-1,1']);
  numberListAt(pre, 'mean', 'run.preprocessing');
  numberListAt(pre, 'std', 'run.preprocessing');
  choiceAt(pre, 'layout', 'run.preprocessing', ['nhwc', 'nchw']);
  checkConfig(objectAt(run['config'], 'run.config'));
  return eachAt(run, 'curve', 'run', checkPoint).length;
}

function checkConfig(config: Json): void {
  eachAt(config, 'attacks', 'run.config', (a, p) => {
    attackAt(a, 'id', p);
    objectAt(a['options'], at(p, 'options'));
  });
  choiceAt(config, 'norm', 'run.config', NORMS);
  const eps = numberListAt(config, 'eps', 'run.config');
  if (config['epsLabels'] !== undefined) {
    const labels = stringListAt(config, 'epsLabels', 'run.config');
    if (labels.length !== eps.length) fail('run.config.epsLabels', `${eps.length} labels, one per budget`, labels);
  }
  numberAt(config, 'seed', 'run.config');
  numberAt(config, 'batchSize', 'run.config');
}

function checkPoint(p: Json, path: string): void {
  attackAt(p, 'attack', path);
  choiceAt(p, 'norm', path, NORMS);
  for (const key of ['eps', 'samples', 'cleanCorrect', 'robust', 'robustAccuracy', 'ci95Low', 'ci95High', 'attackSuccessRate']) numberAt(p, key, path);
}

function checkRecord(r: Json, path: string, curveLength: number): void {
  numberAt(r, 'index', path);
  stringAt(r, 'file', path);
  for (const key of ['label', 'cleanPred', 'cleanConf']) numberAt(r, key, path);
  const outcomes = eachAt(r, 'outcomes', path, (o, p) => {
    attackAt(o, 'attack', p);
    for (const key of ['eps', 'advPred', 'advConf', 'linf', 'l2']) numberAt(o, key, p);
    booleanAt(o, 'flipped', p);
  });
  if (outcomes.length !== curveLength) fail(at(path, 'outcomes'), `${curveLength} outcomes, one per curve point`, listAt(r['outcomes'], path));
  const minFlip = objectAt(r['minFlipEps'], at(path, 'minFlipEps'));
  for (const [key, value] of Object.entries(minFlip)) {
    if (!isAttackId(key)) throw new SavedRunError(`${at(path, 'minFlipEps')} names an unknown search "${key}"`);
    if (value !== null && (typeof value !== 'number' || !Number.isFinite(value))) fail(`${at(path, 'minFlipEps')}.${key}`, 'a number or null', value);
  }
}

function checkFlip(f: Json, path: string): void {
  attackAt(f, 'attack', path);
  stringAt(f, 'file', path);
  for (const key of ['eps', 'index', 'label', 'cleanPred', 'cleanConf', 'advPred', 'advConf']) numberAt(f, key, path);
  for (const key of ['originalPng', 'adversarialPng']) {
    const png = stringAt(f, key, path);
    // Every PNG starts with the same 8 bytes, which base64 writes as "iVBORw0KGgo".
    if (!isBase64(png) || !png.startsWith('iVBORw0KGgo')) fail(at(path, key), 'a base64 PNG image', png.slice(0, 12));
  }
}

function checkHealth(h: Json, path: string): void {
  for (const key of ['check', 'status', 'detail']) stringAt(h, key, path);
  if (h['title'] !== undefined) stringAt(h, 'title', path);
  if (h['numbers'] !== undefined) objectAt(h['numbers'], at(path, 'numbers'));
}

function attackAt(o: Json, key: string, path: string): AttackId {
  const id = stringAt(o, key, path);
  if (!isAttackId(id)) throw new SavedRunError(`${at(path, key)}: unknown search "${id}" (this Brink knows ${attackIds().join(', ')})`);
  return id;
}
