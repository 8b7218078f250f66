// What the worker does with one request: run solveCampaign with the previous result of the same
// campaign (same model and estimator) as its warm start. Pure apart from the injected cache, so it
// runs unchanged in Node tests and in the worker.
import { solveCampaign } from '../campaign/index.ts';
import type { CampaignResult } from '../campaign/result.ts';
import type { SolveRequest, SolveResponse } from './solve-protocol.ts';
import { fitChartData } from './fit-chart-data.ts';

/** Previous results by campaign id, for warm starts. */
export type WarmStartCache = Map<string, CampaignResult>;

export function handleSolveRequest(req: SolveRequest, cache: WarmStartCache, clock: () => number = () => performance.now()): SolveResponse {
  const prior = req.warmStart ? cache.get(req.campaignId) : undefined;
  const previous = prior && prior.model === (req.options.model ?? prior.model) && prior.estimator === (req.options.estimator ?? prior.estimator)
    ? prior : undefined;
  const t0 = clock();
  try {
    const result = solveCampaign(req.records, { ...req.options, ...(previous ? { previous } : {}) });
    const solveMs = clock() - t0;
    cache.set(req.campaignId, result);
    return { type: 'result', requestId: req.requestId, campaignId: req.campaignId, result, chart: fitChartData(req.records, result), solveMs, warmStarted: previous !== undefined };
  } catch (err) {
    // A throw here is a programmer or shape error (numerical outcomes are a status on the result);
    // it goes back to the page to be shown, never swallowed.
    const e = err instanceof Error ? err : new Error(String(err));
    return { type: 'error', requestId: req.requestId, campaignId: req.campaignId, name: e.name, message: e.message };
  }
}
