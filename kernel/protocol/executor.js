/**
 * What the protocol layer asks of whatever runs cells, and what it hears back. The message
 * handlers (kernel.ts) depend on this interface only: executor/host.ts implements it for
 * TypeScript cells in a child process; the handlers' unit tests drive it with a small in-memory one.
 */
export {};
//# sourceMappingURL=executor.js.map