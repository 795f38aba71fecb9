/**
 * How much memory and output one cell may use. Defaults: memory is half the machine's RAM, at most
 * 4096 MB; output is 10 MB per cell. `CHERNEL_CELL_MEMORY_MB` and `CHERNEL_OUTPUT_MB` (for example
 * in the kernelspec's `env`) change them.
 */
export interface CellLimits {
    /** The whole cell process: JavaScript heap, typed arrays, native buffers (resident size). */
    totalMb: number;
    /** The worker's JavaScript heap, a share of the total so the heap limit is met first. */
    heapMb: number;
    outputBytes: number;
    /** Where the memory limit came from, said in the error when it is hit. */
    source: string;
}
export declare const DEFAULT_CELL_MEMORY_MB: number;
export declare const DEFAULT_OUTPUT_MB = 10;
/** The limits from the environment (the kernel logs `warnings` once, at start). */
export declare function cellLimits(env: NodeJS.ProcessEnv, warnings?: string[]): CellLimits;
