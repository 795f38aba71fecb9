/**
 * The kernel's own log, on stderr (Jupyter servers show it in their console). Rate-limited so a
 * flood of bad messages cannot turn into a flood of log lines.
 */
const WINDOW_MS = 10_000;
const PER_WINDOW = 20;
let windowStart = 0;
let inWindow = 0;
let suppressed = 0;
export function log(message) {
    const now = Date.now();
    if (now - windowStart > WINDOW_MS) {
        if (suppressed > 0)
            process.stderr.write(`[chernel] (${suppressed} similar log lines not shown)\n`);
        windowStart = now;
        inWindow = 0;
        suppressed = 0;
    }
    if (++inWindow > PER_WINDOW) {
        suppressed++;
        return;
    }
    process.stderr.write(`[chernel] ${message}\n`);
}
//# sourceMappingURL=log.js.map