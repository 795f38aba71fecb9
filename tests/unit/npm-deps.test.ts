// scripts/npm-deps.js, the first thing `npm start` and `npm run setup` run: it must tell a complete
// install from an absent, interrupted or half-deleted one by the lock's own list of packages. A
// small lock and node_modules are made by hand here (npm's lockfile v3 layout: "packages" keyed by
// install path, and node_modules/.package-lock.json written when an install completes).
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { installProblem } from '../../scripts/npm-deps.js';

const otherPlatform = process.platform === 'linux' ? 'darwin' : 'linux';

const lock = {
  name: 'example',
  lockfileVersion: 3,
  packages: {
    '': { name: 'example' },
    'node_modules/left': { version: '1.2.3' },
    'node_modules/@scope/right': { version: '0.1.0' },
    'node_modules/left/node_modules/nested': { version: '2.0.0' },
    'node_modules/linked': { resolved: '../linked', link: true },
    // A platform binary for another machine: npm skips it, and so must the check.
    'node_modules/binary-elsewhere': { version: '1.0.0', optional: true, os: [otherPlatform], cpu: [process.arch] },
    // The same for this machine: it must be there.
    'node_modules/binary-here': { version: '1.0.0', optional: true, os: [process.platform], cpu: [process.arch] },
  },
};

function put(dir: string, path: string, version: string): void {
  const file = join(dir, path, 'package.json');
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify({ name: path.split('node_modules/').pop(), version }));
}

describe('scripts/npm-deps.js installProblem', () => {
  let dir: string;

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'chernel-npm-deps-'));
    writeFileSync(join(dir, 'package-lock.json'), JSON.stringify(lock));
    put(dir, 'node_modules/left', '1.2.3');
    put(dir, 'node_modules/@scope/right', '0.1.0');
    put(dir, 'node_modules/left/node_modules/nested', '2.0.0');
    put(dir, 'node_modules/binary-here', '1.0.0');
    mkdirSync(join(dir, 'node_modules', 'linked'));
    writeFileSync(join(dir, 'node_modules', '.package-lock.json'), JSON.stringify(lock));
  });

  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('accepts a complete install (the other platform\'s optional binary absent)', () => {
    expect(installProblem(dir)).toBeNull();
  });

  it('names a deleted package, nested ones included', () => {
    rmSync(join(dir, 'node_modules', 'left', 'node_modules', 'nested'), { recursive: true });
    expect(installProblem(dir)).toBe('node_modules/left/node_modules/nested is missing');
  });

  it('names a missing binary meant for this machine', () => {
    rmSync(join(dir, 'node_modules', 'binary-here'), { recursive: true });
    expect(installProblem(dir)).toBe('node_modules/binary-here is missing');
  });

  it('names a package at another version than the lock\'s', () => {
    put(dir, 'node_modules/@scope/right', '0.2.0');
    expect(installProblem(dir)).toBe('node_modules/@scope/right is 0.2.0, the lock wants 0.1.0');
  });

  it('names a missing link to a local package', () => {
    rmSync(join(dir, 'node_modules', 'linked'), { recursive: true });
    expect(installProblem(dir)).toBe('node_modules/linked (a link to ../linked) is missing');
  });

  it('takes an install that never wrote its record as unfinished, and no node_modules as absent', () => {
    rmSync(join(dir, 'node_modules', '.package-lock.json'));
    expect(installProblem(dir)).toBe('node_modules is absent or its install did not finish');
    rmSync(join(dir, 'node_modules'), { recursive: true });
    expect(installProblem(dir)).toBe('node_modules is absent or its install did not finish');
  });
});
