/**
 * The kernel's own log, on stderr (Jupyter servers show it in their console). Rate-limited so a
 * flood of bad messages cannot turn into a flood of log lines.
 */
export declare function log(message: string): void;
