import type { SplitPlan } from './compute-client.js';
/** Workers per view: the cores the browser reports, at most four. */
export declare function engineWorkers(cores?: any): number;
export declare function splitPlan(workers: number): SplitPlan;
