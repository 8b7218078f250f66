// The report worker: builds the report data and the HTML off the main thread, posting progress.
/// <reference lib="webworker" />
import { buildReportData } from '../../io/report-data.ts';
import { campaignReportHtml } from '../../io/report-html.ts';
import type { ReportReply, ReportRequest } from './report-protocol.ts';

const post = (m: ReportReply): void => (self as unknown as DedicatedWorkerGlobalScope).postMessage(m);

self.onmessage = (event: MessageEvent<ReportRequest>) => {
  const req = event.data;
  try {
    let last = 0;
    const data = buildReportData(req.file, {
      generatedAt: req.generatedAt, replicates: req.replicates,
      onProgress: (stage, done, total) => {
        // At most ~50 messages a second: the bar needs no more.
        const now = Date.now();
        if (now - last > 20 || done === total) { last = now; post({ kind: 'progress', stage, done, total }); }
      },
    });
    post({ kind: 'done', html: campaignReportHtml(data) });
  } catch (err) {
    post({ kind: 'failed', message: err instanceof Error ? err.message : String(err) });
  }
};
