// "Report": builds the printable campaign report in a worker and offers it as one HTML file to
// open, print to PDF or share. Works offline (nothing is fetched). Mount it with a loader:
//   <ReportAction loadCampaign={async () => campaignFileOf(await loadCampaignRecords(db, cid))} />
import { IonButton, IonProgressBar } from '@ionic/react';
import { useEffect, useRef, useState } from 'react';
import type { CampaignFile } from '../../campaign/records.ts';
import type { ReportReply, ReportRequest } from './report-protocol.ts';

type State = { phase: 'idle' } | { phase: 'working'; stage: string; fraction: number } | { phase: 'ready'; url: string; name: string } | { phase: 'failed'; message: string };

export interface ReportActionProps {
  loadCampaign: () => Promise<CampaignFile | undefined>;
  /** Bootstrap replicates per estimator (the worker's default is the report's, 1000). */
  replicates?: number;
}

const fileName = (name: string): string => `${name.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-|-$/g, '') || 'campaign'}-report.html`;

export function ReportAction({ loadCampaign, replicates }: ReportActionProps) {
  const [state, setState] = useState<State>({ phase: 'idle' });
  const worker = useRef<Worker | null>(null);
  useEffect(() => () => {
    worker.current?.terminate();
    worker.current = null;
  }, []);
  useEffect(() => () => { if (state.phase === 'ready') URL.revokeObjectURL(state.url); }, [state]);

  const start = async (): Promise<void> => {
    setState({ phase: 'working', stage: 'loading the campaign', fraction: 0 });
    let file: CampaignFile | undefined;
    try {
      file = await loadCampaign();
    } catch (err) {
      setState({ phase: 'failed', message: err instanceof Error ? err.message : String(err) });
      return;
    }
    if (!file) {
      setState({ phase: 'failed', message: 'campaign not found on this device' });
      return;
    }
    const name = file.name;
    worker.current?.terminate();
    const w = new Worker(new URL('./report-worker.ts', import.meta.url), { type: 'module', name: 'arcfield-report' });
    worker.current = w;
    w.onmessage = (event: MessageEvent<ReportReply>) => {
      const m = event.data;
      if (m.kind === 'progress') setState({ phase: 'working', stage: m.stage, fraction: m.total > 0 ? m.done / m.total : 0 });
      else {
        w.terminate();
        worker.current = null;
        if (m.kind === 'done') setState({ phase: 'ready', url: URL.createObjectURL(new Blob([m.html], { type: 'text/html' })), name: fileName(name) });
        else setState({ phase: 'failed', message: m.message });
      }
    };
    w.onerror = (e) => setState({ phase: 'failed', message: e.message || 'the report worker stopped' });
    const req: ReportRequest = { kind: 'report', file, generatedAt: new Date().toISOString().replace(/\.\d{3}Z$/, 'Z'), replicates };
    w.postMessage(req);
  };

  return (
    <div className="af-card" data-testid="report-action">
      <h2>Campaign report</h2>
      <p>A printable document: the figure with its uncertainties, the five estimators, the reference ellipsoids, charts, flagged readings, reliability and where to observe next.</p>
      {state.phase === 'working' ? (
        <>
          <IonProgressBar value={state.fraction} />
          <p role="status">Working: {state.stage}…</p>
        </>
      ) : (
        <IonButton expand="block" onClick={() => void start()} data-testid="report-build">Build the report</IonButton>
      )}
      {state.phase === 'ready' && (
        <IonButton expand="block" fill="outline" href={state.url} download={state.name} target="_blank" data-testid="report-open">Open the report ({state.name})</IonButton>
      )}
      {state.phase === 'failed' && <p role="alert">The report could not be built: {state.message}</p>}
    </div>
  );
}
