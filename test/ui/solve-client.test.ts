// The page side of the solve worker: latest wins (a newer request supersedes the waiting one),
// at most one request in the worker, stale answers ignored, a crashed worker reported and replaced.
// The worker is a scripted fake, so the order of events is exact.
import { describe, expect, it } from 'vitest';
import type { CampaignRecords } from '../../src/campaign/records.ts';
import type { CampaignResult } from '../../src/campaign/result.ts';
import { SolveClient, type SolveOutcome, type WorkerLike } from '../../src/worker/solve-client.ts';
import type { SolveRequest, SolveResponse } from '../../src/worker/solve-protocol.ts';

class FakeWorker implements WorkerLike {
  received: SolveRequest[] = [];
  onmessage: ((ev: MessageEvent<SolveResponse>) => void) | null = null;
  onerror: ((ev: ErrorEvent) => void) | null = null;
  terminated = false;
  postMessage(m: SolveRequest): void { this.received.push(m); }
  terminate(): void { this.terminated = true; }
  answer(req: SolveRequest): void {
    const result = { engineVersion: 'fake', status: 'ok' } as unknown as CampaignResult;
    this.onmessage?.({ data: { type: 'result', requestId: req.requestId, campaignId: req.campaignId, result, chart: { points: [], curve: [], xLabel: '', yLabel: '' }, solveMs: 1, warmStarted: false } } as unknown as MessageEvent<SolveResponse>);
  }
}

const records = (n: number): CampaignRecords => ({ name: `v${n}`, stations: [], latitudeReadings: [], arcReadings: [] });

describe('SolveClient', () => {
  it('keeps one request in the worker and lets the newest waiting one win', async () => {
    const workers: FakeWorker[] = [];
    const client = new SolveClient(() => { const w = new FakeWorker(); workers.push(w); return w; }, () => 0);
    const outcomes: SolveOutcome[] = [];
    const p1 = client.solve('c1', records(1)).then((o) => outcomes.push(o));
    const p2 = client.solve('c1', records(2)).then((o) => outcomes.push(o));
    const p3 = client.solve('c1', records(3)).then((o) => outcomes.push(o));
    expect(workers).toHaveLength(1);
    expect(workers[0].received.map((r) => r.records.name)).toEqual(['v1']);
    expect(client.pending).toBe(2);
    await p2; // superseded by v3 at once, without reaching the worker
    expect(outcomes[0]).toEqual({ status: 'superseded', requestId: 2 });
    workers[0].answer(workers[0].received[0]);
    await p1;
    expect(workers[0].received.map((r) => r.records.name)).toEqual(['v1', 'v3']);
    workers[0].answer(workers[0].received[1]);
    await p3;
    expect(outcomes.map((o) => [o.status, o.requestId])).toEqual([['superseded', 2], ['solved', 1], ['solved', 3]]);
    expect(client.pending).toBe(0);
  });

  it('ignores an answer to a request it no longer waits for', async () => {
    const w = new FakeWorker();
    const client = new SolveClient(() => w, () => 0);
    const p = client.solve('c1', records(1));
    w.answer({ ...w.received[0], requestId: 99 });
    expect(client.pending).toBe(1);
    w.answer(w.received[0]);
    expect((await p).status).toBe('solved');
  });

  it('reports a crashed worker and starts a fresh one for the next request', async () => {
    const workers: FakeWorker[] = [];
    const client = new SolveClient(() => { const w = new FakeWorker(); workers.push(w); return w; }, () => 0);
    const p = client.solve('c1', records(1));
    workers[0].onerror?.({ message: 'boom', preventDefault: () => undefined } as ErrorEvent);
    expect(await p).toMatchObject({ status: 'failed', name: 'WorkerError', message: 'boom' });
    expect(workers[0].terminated).toBe(true);
    const q = client.solve('c1', records(2));
    expect(workers).toHaveLength(2);
    workers[1].answer(workers[1].received[0]);
    expect((await q).status).toBe('solved');
    client.dispose();
  });
});
