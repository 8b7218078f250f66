// Messages between the Report action and its worker (the report runs five fits, five bootstraps
// and one solve per reading: seconds of CPU, never on the main thread — design.md).
import type { CampaignFile } from '../../campaign/records.ts';

export interface ReportRequest { kind: 'report'; file: CampaignFile; generatedAt: string; replicates?: number }
export type ReportReply =
  | { kind: 'progress'; stage: string; done: number; total: number }
  | { kind: 'done'; html: string }
  | { kind: 'failed'; message: string };
