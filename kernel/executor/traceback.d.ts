/**
 * Errors as the notebook shows them, and as saved notebooks and exported pages keep them: frames in
 * cells are given as the cell's label and line (via each cell's source map); a run of engine frames
 * becomes one line naming the engine function the cell called (and the one that failed); frames
 * inside the kernel and Node are dropped. No path of this machine is written: other frames keep
 * their package-relative path (`node_modules/...`) or their file name, and paths in the message
 * are shortened the same way.
 */
import type { SourceMap } from 'node:module';
import type { CellError } from '../protocol/executor.js';
import type { SerializedError } from './channel.js';
/** A path that may be shown: from `node_modules/` on, else the file name. */
export declare function shortPath(path: string): string;
export declare class CellRegistry {
    private readonly kernelDir;
    private readonly cells;
    /** The engine's sources (src/, and the widget code the kernel shares) beside the kernel. */
    private readonly engineDirs;
    /** Folders of this machine that never appear in an output, longest first. */
    private readonly privateDirs;
    constructor(kernelDir: string);
    /** Text with this machine's paths (and file: URLs of them) shortened. */
    scrub(text: string): string;
    add(filename: string, label: string, source: string, map: SourceMap): void;
    /** Forget every cell (their code is gone with a restarted worker). */
    clear(): void;
    private sourceLine;
    syntaxError(label: string, source: string, message: string, line: number, column: number): CellError;
    format(error: SerializedError, note?: string): CellError;
}
