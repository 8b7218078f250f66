// The solve worker: solveCampaign off the main thread, latest request wins.
export { SolveClient, startSolveWorker, type SolveOutcome, type WorkerLike } from './solve-client.ts';
export { handleSolveRequest, type WarmStartCache } from './solve-handler.ts';
export { SOLVE_PROTOCOL_VERSION, type SolveRequest, type SolveResponse, type SolveRequestOptions } from './solve-protocol.ts';
export { fitChartData, CURVE_SAMPLES, type ChartPoint, type FitChartData } from './fit-chart-data.ts';
