/**
 * Errors as the notebook shows them: frames in cells are given as the cell's label and line (via
 * each cell's source map), frames inside the kernel and Node are dropped, engine frames stay.
 */

import type { SourceMap } from 'node:module';
import type { SerializedError } from './channel.js';
import { mapLine } from './transpile.js';

const RED = '\x1b[31m';
const GREEN = '\x1b[32m';
const RESET = '\x1b[0m';

export interface FormattedError {
  ename: string;
  evalue: string;
  traceback: string[];
}

interface CellRecord {
  label: string;
  lines: string[];
  map: SourceMap;
}

const FRAME = /^\s*at (?:(.+?) \()?(.+?):(\d+):(\d+)\)?$/;
const CELL_FILE = /^cell-\d+\.ts$/;

export class CellRegistry {
  private readonly cells = new Map<string, CellRecord>();

  constructor(private readonly kernelDir: string) {}

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

  syntaxError(label: string, source: string, message: string, line: number, column: number): FormattedError {
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

  format(error: SerializedError, note?: string): FormattedError {
    const traceback = [`${RED}${error.name}${RESET}: ${error.message}`];
    for (const raw of error.stack.split('\n')) {
      const m = FRAME.exec(raw);
      if (!m) continue;
      const [, fn, file, lineText, columnText] = m;
      if (CELL_FILE.test(file)) {
        const cell = this.cells.get(file);
        if (!cell) continue;
        const line = mapLine(cell.map, Number(lineText), Number(columnText));
        if (line === null) continue;
        const where = `${cell.label}, line ${line}`;
        const name = fn && fn !== 'async' && !fn.startsWith('async ') ? fn.replace(/^async /, '') : null;
        traceback.push(name && name !== '<anonymous>' ? `    at ${name} (${where})` : `    at ${where}`, this.sourceLine(cell.lines, line));
      } else if (file.startsWith('node:') || file.includes(this.kernelDir) || file.startsWith('evalmachine')) {
        continue;
      } else {
        traceback.push(raw.replace(/^\s*/, '    '));
      }
    }
    if (note) traceback.push(note);
    return { ename: error.name, evalue: error.message, traceback: traceback.filter((l) => l !== '') };
  }
}
