/**
 * Cancellation and cooperative scheduling for long searches. A search runs in a Web Worker whose
 * cancel message can only be delivered between macrotasks, so loops give the event loop a turn
 * every so often and check the abort signal between steps.
 */

/** Throws the signal's reason (an AbortError from AbortController.abort()) if it has fired. */
export function throwIfAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw signal.reason;
}

/** How long a search may hold the thread before it lets queued messages run. */
const YIELD_EVERY_MS = 25;

/** Returns a function that, when awaited between steps, yields a macrotask turn at most every few ms. */
export function makeYielder(): () => Promise<void> {
  let last = performance.now();
  return async () => {
    const now = performance.now();
    if (now - last < YIELD_EVERY_MS) return;
    // A resolved promise only runs microtasks; a timer lets the worker's message queue run.
    await new Promise<void>((resolve) => setTimeout(resolve, 0));
    last = performance.now();
  };
}
