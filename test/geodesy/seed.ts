// Seeds and run counts for the geodesy property tests: cheap by default, extensive on demand
// (ARCFIELD_FC_RUNS=5000), replayable with ARCFIELD_FC_SEED. Each suite prints its seed.
export const FC_SEED = process.env.ARCFIELD_FC_SEED !== undefined ? Number(process.env.ARCFIELD_FC_SEED) : 20260602;
export const FC_RUNS = process.env.ARCFIELD_FC_RUNS !== undefined ? Number(process.env.ARCFIELD_FC_RUNS) : 300;

export function announceSeed(suite: string): { seed: number; numRuns: number } {
  console.info(`${suite}: fast-check seed ${FC_SEED}, ${FC_RUNS} runs (replay with ARCFIELD_FC_SEED=${FC_SEED})`);
  return { seed: FC_SEED, numRuns: FC_RUNS };
}
