/** The page's one engine worker, shared by every action module. */
import type { EngineClient } from '../../worker/client.ts';

let engine: EngineClient | null = null;

/** Remember the started worker. */
export function setEngine(client: EngineClient): void {
  engine = client;
}

/** The started worker (throws before startEngine has run). */
export function client(): EngineClient {
  if (engine === null) throw new Error('The engine has not started.');
  return engine;
}

/** An error as one line of text for the screen. */
export function messageOf(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}
