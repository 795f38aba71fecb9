/**
 * Cooperative interruption of long engine loops.
 *
 * The host (kernel worker, Web Worker, shard runner) installs a shared Int32Array; setting its
 * first element to a non-zero value from another thread makes the next `checkInterrupt()` throw.
 * Engine loops call `checkInterrupt()` once per row of k-points or per parameter point: cheap
 * enough to be invisible, frequent enough to stop within a fraction of a second.
 */

export class InterruptedError extends Error {
  constructor() {
    super('computation interrupted');
    this.name = 'InterruptedError';
  }
}

let flag: Int32Array | null = null;

/** Install (or with `null`, remove) the shared flag checked by `checkInterrupt`. */
export function installInterruptFlag(shared: Int32Array | null): void {
  flag = shared;
}

let heartbeat: (() => void) | null = null;

/**
 * Install (or with `null`, remove) a function called at every check: a sign of life from long
 * loops, which a host uses to show that a computation is still running (the kernel's progress bar).
 */
export function onInterruptCheck(fn: (() => void) | null): void {
  heartbeat = fn;
}

/** Throw `InterruptedError` if the host asked to stop; the flag stays set until the host clears it. */
export function checkInterrupt(): void {
  if (flag !== null && Atomics.load(flag, 0) !== 0) throw new InterruptedError();
  if (heartbeat !== null) heartbeat();
}
