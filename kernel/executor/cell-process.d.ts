/**
 * The process that runs cells, one step away from the kernel's own process. A cell can do what
 * V8 treats as fatal (an array past its largest size aborts the whole process, whatever the
 * worker's heap limit), so cells run in a worker thread inside this child process: whatever a cell
 * does, the process that talks to the front end survives and starts a fresh one.
 *
 * This process relays messages between the kernel (IPC) and the worker, owns the interrupt flag
 * the engine's loops read, bounds the cell's memory (the worker's heap through `resourceLimits`,
 * everything else, typed arrays included, through the process's resident size, polled), and caps
 * how much output one cell may send.
 */
/** What the cell process tells the kernel besides the worker's own messages. */
export type CellProcessNotice = {
    type: 'fatal';
    reason: string;
};
