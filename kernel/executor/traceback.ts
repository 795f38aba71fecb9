/**
 * Errors as the notebook shows them, and as saved notebooks and exported pages keep them: frames in
 * cells are given as the cell's label and line (via each cell's source map); a run of engine frames
 * becomes one line naming the engine function the cell called (and the one that failed); frames
 * inside the kernel and Node are dropped. No path of this machine is written: other frames keep
 * their package-relative path (`node_modules/...`) or their file name, and paths in the message
 * are shortened the same way.
 */

import type { SourceMap } from 'node:module';
import { homedir } from 'node:os';
import { basename, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { CellError } from '../protocol/executor.js';
import type { SerializedError } from './channel.js';
import { mapLine } from './transpile.js';

const RED = '\x1b[31m';
const GREEN = '\x1b[32m';
const RESET = '\x1b[0m';

interface CellRecord {
  label: string;
  lines: string[];
  map: SourceMap;
}

const FRAME = /^\s*at (?:(.+?) \()?(.+?):(\d+):(\d+)\)?$/;
const CELL_FILE = /^cell-\d+\.ts$/;

/** A file path or file: URL as it appears in a stack frame, as a plain path. */
function pathOf(file: string): string {
  if (!file.startsWith('file://')) return file;
  try {
    return fileURLToPath(file);
  } catch {
    return file;
  }
}

/** A path that may be shown: from `node_modules/` on, else the file name. */
export function shortPath(path: string): string {
  const i = path.lastIndexOf(`node_modules${sep}`);
  return i >= 0 ? path.slice(i) : basename(path);
}

export class CellRegistry {
  private readonly cells = new Map<string, CellRecord>();
  /** The engine's sources (src/, and the widget code the kernel shares) beside the kernel. */
  private readonly engineDirs: string[];
  /** Folders of this machine that never appear in an output, longest first. */
  private readonly privateDirs: string[];

  constructor(private readonly kernelDir: string) {
    const root = resolve(kernelDir, '..');
    this.engineDirs = [resolve(root, 'src') + sep, resolve(root, 'widgets', 'src') + sep];
    // The kernel may run from a build folder (dist/) inside the project: both are private.
    this.privateDirs = [root, resolve(root, '..'), process.cwd(), homedir()].filter((d) => d.length > 1).sort((a, b) => b.length - a.length);
  }

  /** Text with this machine's paths (and file: URLs of them) shortened. */
  scrub(text: string): string {
    let out = text.replace(/file:\/\/[^\s'"`)]+/g, (url) => shortPath(pathOf(url)));
    for (const dir of this.privateDirs) {
      out = out.split(dir + sep).join('').split(dir).join('.');
    }
    return out;
  }

  add(filename: string, label: string, source: string, map: SourceMap): void {
    this.cells.set(filename, { label, lines: source.split('\n'), map });
  }

  /** Forget every cell (their code is gone with a restarted worker). */
  clear(): void {
    this.cells.clear();
  }

  private sourceLine(lines: string[], line: number): string {
    const text = lines[line - 1];
    return text === undefined ? '' : `${GREEN}${String(line).padStart(6)} |${RESET} ${text}`;
  }

  syntaxError(label: string, source: string, message: string, line: number, column: number): CellError {
    const lines = source.split('\n');
    return {
      ename: 'SyntaxError',
      evalue: message,
      traceback: [
        `${RED}SyntaxError${RESET}: ${message}`,
        `    at ${label}, line ${line}, column ${column}`,
        this.sourceLine(lines, line),
        `${' '.repeat(9 + column)}^`,
      ],
    };
  }

  format(error: SerializedError, note?: string): CellError {
    const message = this.scrub(error.message);
    const traceback = [`${RED}${error.name}${RESET}: ${message}`];
    /** The engine functions of the current run of engine frames, innermost first. */
    let engine: string[] = [];
    const flushEngine = (): void => {
      if (engine.length === 0) return;
      const called = engine[engine.length - 1];
      const failed = engine[0];
      traceback.push(`    at ${called} (chernel engine${failed !== called ? `, in ${failed}` : ''})`);
      engine = [];
    };
    for (const raw of error.stack.split('\n')) {
      const m = FRAME.exec(raw);
      if (!m) continue;
      const [, fn, rawFile, lineText, columnText] = m;
      const file = pathOf(rawFile);
      const name = fn && fn !== 'async' ? fn.replace(/^async /, '').replace(/^(?:Module|Object)\./, '') : null;
      if (this.engineDirs.some((dir) => file.startsWith(dir))) {
        engine.push(name && name !== '<anonymous>' ? name : basename(file).replace(/\.[jt]s$/, ''));
        continue;
      }
      if (file.startsWith('node:') || file.startsWith(this.kernelDir) || file.startsWith('evalmachine')) continue;
      flushEngine();
      if (CELL_FILE.test(file)) {
        const cell = this.cells.get(file);
        if (!cell) continue;
        const line = mapLine(cell.map, Number(lineText), Number(columnText));
        if (line === null) continue;
        const where = `${cell.label}, line ${line}`;
        traceback.push(name && name !== '<anonymous>' ? `    at ${name} (${where})` : `    at ${where}`, this.sourceLine(cell.lines, line));
      } else {
        const where = `${shortPath(file)}:${lineText}`;
        traceback.push(name ? `    at ${name} (${where})` : `    at ${where}`);
      }
    }
    flushEngine();
    if (note) traceback.push(this.scrub(note));
    return { ename: error.name, evalue: message, traceback: traceback.filter((l) => l !== '') };
  }
}
