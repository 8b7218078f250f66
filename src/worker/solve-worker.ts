// Worker entry: runs solveCampaign off the main thread (the UI never calls the fitter itself).
// Started by SolveClient with `new Worker(new URL('./solve-worker.ts', import.meta.url), { type: 'module' })`.
import { handleSolveRequest, type WarmStartCache } from './solve-handler.ts';
import { SOLVE_PROTOCOL_VERSION, type SolveRequest, type SolveResponse } from './solve-protocol.ts';

interface WorkerScope {
  onmessage: ((ev: MessageEvent<SolveRequest>) => void) | null;
  postMessage(message: SolveResponse): void;
}

const scope = globalThis as unknown as WorkerScope;
const cache: WarmStartCache = new Map();

scope.onmessage = (ev) => {
  const req = ev.data;
  if (req?.type !== 'solve' || req.protocol !== SOLVE_PROTOCOL_VERSION) {
    scope.postMessage({
      type: 'error', requestId: typeof req?.requestId === 'number' ? req.requestId : -1, campaignId: String(req?.campaignId ?? ''),
      name: 'ProtocolError', message: `solve worker: expected protocol ${SOLVE_PROTOCOL_VERSION}, got ${JSON.stringify(req?.protocol)}`,
    });
    return;
  }
  scope.postMessage(handleSolveRequest(req, cache));
};
