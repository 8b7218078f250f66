// The tiny typed protocol between the page and the solve worker. Plain data only (structured
// clone); every message names its request so a stale answer can be recognised.
import type { CampaignRecords } from '../campaign/records.ts';
import type { CampaignResult, SolveOptions } from '../campaign/result.ts';
import type { FitChartData } from './fit-chart-data.ts';

export const SOLVE_PROTOCOL_VERSION = 1;

/** Options the page may send; `previous` is kept inside the worker (no need to clone it back). */
export type SolveRequestOptions = Omit<SolveOptions, 'previous'>;

export interface SolveRequest {
  type: 'solve';
  protocol: typeof SOLVE_PROTOCOL_VERSION;
  requestId: number;
  campaignId: string;
  records: CampaignRecords;
  options: SolveRequestOptions;
  /** Use the worker's previous result for this campaign as a warm start (default true). */
  warmStart: boolean;
}

export interface SolveResultMessage {
  type: 'result';
  requestId: number;
  campaignId: string;
  result: CampaignResult;
  /** What the live-fit chart draws (computed here, off the main thread). */
  chart: FitChartData;
  /** Time spent inside solveCampaign, ms (worker clock). */
  solveMs: number;
  warmStarted: boolean;
}

export interface SolveErrorMessage {
  type: 'error';
  requestId: number;
  campaignId: string;
  name: string;
  message: string;
}

export type SolveResponse = SolveResultMessage | SolveErrorMessage;
