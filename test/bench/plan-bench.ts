/** Advice timing for the benchmark; filled in once the planner exists. */
export async function runPlanBench(_wav: string): Promise<void> {}
