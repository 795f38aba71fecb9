// Makes each package folder's node_modules match its package-lock.json, running `npm ci` where it
// does not: absent, half-installed (an interrupted install, a deleted package) or at versions the
// lock does not name. Every package of the lock is checked (a few ms), not a timestamp. Plain Node with no npm package, so that it can run first on a fresh clone.
//
//   node scripts/npm-deps.js [folder ...]     (default: . widgets lab)
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const projectDir = resolve(fileURLToPath(new URL('..', import.meta.url)));

/** Whether an optional package (a platform binary, typically) is meant for this machine. */
function meantForHere(entry) {
  const matches = (list, value) => list.some(item => item === value || (item.startsWith('!') ? item.slice(1) !== value : false));
  if (!entry.os || !entry.cpu) return false;
  if (!matches(entry.os, process.platform) || !matches(entry.cpu, process.arch)) return false;
  const libc = process.report?.getReport().header.glibcVersionRuntime ? 'glibc' : 'musl';
  return !entry.libc || entry.libc.includes(libc);
}

/** Why `dir`'s node_modules does not match its lock (the first thing found), or null when it does. */
export function installProblem(dir) {
  const lock = JSON.parse(readFileSync(join(dir, 'package-lock.json'), 'utf8'));
  const hidden = join(dir, 'node_modules', '.package-lock.json');
  if (!existsSync(hidden)) return 'node_modules is absent or its install did not finish';
  for (const [path, entry] of Object.entries(lock.packages ?? {})) {
    if (!path.startsWith('node_modules/')) continue;
    if (entry.optional && !meantForHere(entry)) continue;
    const where = join(dir, path);
    if (entry.link) {
      if (!existsSync(where)) return `${path} (a link to ${entry.resolved}) is missing`;
      continue;
    }
    const manifest = join(where, 'package.json');
    if (!existsSync(manifest)) return `${path} is missing`;
    const version = JSON.parse(readFileSync(manifest, 'utf8')).version;
    if (entry.version && version !== entry.version) return `${path} is ${version}, the lock wants ${entry.version}`;
  }
  return null;
}

/** Runs `npm ci` in every folder whose install is incomplete or stale; throws when one fails. */
export function ensureNpmDeps(dirs, log = console.log) {
  for (const dir of dirs) {
    if (!existsSync(join(dir, 'package-lock.json'))) continue;
    const problem = installProblem(dir);
    if (problem === null) continue;
    const name = relative(projectDir, dir) || '.';
    log(`setup: npm ci in ${name} (${problem})`);
    const result = spawnSync('npm', ['ci', '--no-audit', '--no-fund'], { cwd: dir, stdio: 'inherit' });
    if (result.status !== 0) throw new Error(`setup: \`npm ci\` in ${name} failed (${result.status ?? result.signal ?? result.error?.message})`);
    const after = installProblem(dir);
    if (after !== null) throw new Error(`setup: after \`npm ci\` in ${name}: ${after}`);
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const folders = process.argv.slice(2);
  try {
    ensureNpmDeps((folders.length ? folders : ['.', 'widgets', 'lab']).map(folder => resolve(projectDir, folder)));
  } catch (error) {
    console.error(error.message);
    process.exit(1);
  }
}
