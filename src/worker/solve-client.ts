// The page's side of the solve worker. Latest wins: at most one request is in the worker and at
// most one waits; a newer request replaces the waiting one, whose caller learns it was superseded.
// A save during a long solve therefore costs one extra solve at most, however fast a person types.
import type { CampaignRecords } from '../campaign/records.ts';
import type { CampaignResult } from '../campaign/result.ts';
import type { FitChartData } from './fit-chart-data.ts';
import { SOLVE_PROTOCOL_VERSION, type SolveRequest, type SolveRequestOptions, type SolveResponse } from './solve-protocol.ts';

/** The part of a Worker the client uses (a fake in Node tests). */
export interface WorkerLike {
  postMessage(message: SolveRequest): void;
  onmessage: ((ev: MessageEvent<SolveResponse>) => void) | null;
  onerror: ((ev: ErrorEvent) => void) | null;
  terminate(): void;
}

export type SolveOutcome =
  | { status: 'solved'; requestId: number; result: CampaignResult; chart: FitChartData; solveMs: number; roundTripMs: number; warmStarted: boolean }
  | { status: 'superseded'; requestId: number }
  | { status: 'failed'; requestId: number; name: string; message: string };

interface Job {
  req: SolveRequest;
  resolve: (o: SolveOutcome) => void;
  sentAt: number;
}

/** Start the real worker (Vite bundles it as a separate module chunk). */
export function startSolveWorker(): WorkerLike {
  return new Worker(new URL('./solve-worker.ts', import.meta.url), { type: 'module', name: 'arcfield-solve' });
}

export class SolveClient {
  private worker: WorkerLike | null = null;
  private inFlight: Job | null = null;
  private waiting: Job | null = null;
  private nextId = 1;

  constructor(private readonly createWorker: () => WorkerLike = startSolveWorker, private readonly clock: () => number = () => performance.now()) {}

  solve(campaignId: string, records: CampaignRecords, options: SolveRequestOptions = {}, warmStart = true): Promise<SolveOutcome> {
    const req: SolveRequest = { type: 'solve', protocol: SOLVE_PROTOCOL_VERSION, requestId: this.nextId++, campaignId, records, options, warmStart };
    return new Promise((resolve) => {
      const job: Job = { req, resolve, sentAt: 0 };
      if (this.waiting) this.waiting.resolve({ status: 'superseded', requestId: this.waiting.req.requestId });
      this.waiting = job;
      this.pump();
    });
  }

  /** Requests not yet answered (0, 1 or 2). */
  get pending(): number {
    return (this.inFlight ? 1 : 0) + (this.waiting ? 1 : 0);
  }

  dispose(): void {
    this.worker?.terminate();
    this.worker = null;
    for (const job of [this.inFlight, this.waiting]) job?.resolve({ status: 'failed', requestId: job.req.requestId, name: 'Disposed', message: 'the solver was stopped' });
    this.inFlight = this.waiting = null;
  }

  private ensureWorker(): WorkerLike {
    if (this.worker) return this.worker;
    const w = this.createWorker();
    w.onmessage = (ev) => this.onResponse(ev.data);
    w.onerror = (ev) => {
      ev.preventDefault?.();
      this.failInFlight('WorkerError', ev.message || 'the solve worker crashed');
      // A crashed worker is replaced on the next request.
      this.worker?.terminate();
      this.worker = null;
      this.pump();
    };
    this.worker = w;
    return w;
  }

  private pump(): void {
    if (this.inFlight || !this.waiting) return;
    const job = this.waiting;
    this.waiting = null;
    job.sentAt = this.clock();
    this.inFlight = job;
    this.ensureWorker().postMessage(job.req);
  }

  private failInFlight(name: string, message: string): void {
    const job = this.inFlight;
    this.inFlight = null;
    job?.resolve({ status: 'failed', requestId: job.req.requestId, name, message });
  }

  private onResponse(msg: SolveResponse): void {
    const job = this.inFlight;
    if (!job || msg.requestId !== job.req.requestId) return; // an answer to a request already given up
    this.inFlight = null;
    if (msg.type === 'result') {
      job.resolve({ status: 'solved', requestId: msg.requestId, result: msg.result, chart: msg.chart, solveMs: msg.solveMs, roundTripMs: this.clock() - job.sentAt, warmStarted: msg.warmStarted });
    } else {
      job.resolve({ status: 'failed', requestId: msg.requestId, name: msg.name, message: msg.message });
    }
    this.pump();
  }
}
