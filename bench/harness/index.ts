// The benchmark harness's building blocks (the entry points are bench/run-bench.ts,
// bench/run-ours.ts, bench/update-readme.ts and the scripts in bench/peers/).
export { SplitMix64 } from './seeded-random.ts';
export { DATASET_MAGIC, readDataset, readDatasetHeader, writeDataset, type Dataset, type DatasetHeader } from './dataset-file.ts';
export { DEFAULT_TIMING, median, timeCall, type TimingOptions, type TimingSummary } from './timing.ts';
export { onePassFloor } from './floor-pass.ts';
export { collectGarbage, PeakProbe, snapshot, type MemorySnapshot } from './memory-probe.ts';
export { compareCoefficients, COEFFICIENT_REL_TOL, OBJECTIVE_REL_TOL, objectiveGap, scoreObjective, type CoefficientComparison } from './exactness.ts';
export { COEFFICIENT_REFERENCE, PEERS, type PeerRuntime, type PeerSpec } from './peer-registry.ts';
export { predictSeconds, type Prediction, type SizeTime } from './predict-time.ts';
export { evaluateTargets, TARGET_N, WARM_N } from './targets.ts';
export { readmeSection, README_END, README_START, updateReadme } from './readme-section.ts';
export type { BenchReport, Exactness, MemoryRow, OursRecord, PeerRun, ResultRow, TargetLine, WarmRefitRow } from './report-types.ts';
