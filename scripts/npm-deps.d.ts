/** Why `dir`'s node_modules does not match its package-lock.json, or null when it does. */
export function installProblem(dir: string): string | null;
/** Runs `npm ci` in every folder whose install is incomplete or stale; throws when one fails. */
export function ensureNpmDeps(dirs: string[], log?: (message: string) => void): void;
