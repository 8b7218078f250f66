// One campaign: the running fit, the capture actions, its stations (with reading counts) and arcs.
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonItem, IonLabel, IonList, IonListHeader, IonNote,
  IonPage, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useMemo, useState } from 'react';
import { useParams } from 'react-router-dom';
import { RECORD_TABLES } from '../../io/index.ts';
import { countReadings, getCampaign, importRows, loadCampaignRecords, loadCampaignSnapshot, readingPage, stationsOf, type ImportRowsSummary } from '../../store/index.ts';
import { LiveFitStrip } from '../components/index.ts';
import { ReportAction } from '../decisions/report-action.tsx';
import { campaignFileOf } from '../decisions/campaign-file-of.ts';
import { CsvImportPanel, type CsvImportRequest } from '../decisions/csv-import-panel.tsx';
import { formatLength } from '../format/index.ts';
import { useAppSettings, useLiveFit, useServices } from '../live/index.ts';

/** The campaign screen lists this many arcs inline; the rest are on the readings screen. */
const INLINE_ARCS = 50;

/**
 * "Import CSV", opened on demand: only then are the campaign's records read (and re-read on every
 * change while it is open). The records and their change-log position come from one read; the
 * position goes back to importRows, which refuses a file checked against an older campaign. The
 * live fit needs no nudge: the import's change-log rows move the sequence its liveQuery watches.
 */
function CsvImportSection({ cid }: { cid: string }) {
  const { store } = useServices();
  const [open, setOpen] = useState(false);
  const snapshot = useLiveQuery(() => (open ? loadCampaignSnapshot(store.db, cid) : undefined), [store, cid, open]);
  const file = useMemo(() => (snapshot ? campaignFileOf(snapshot.records) : undefined), [snapshot]);
  const onImport = ({ result, table, mode, version, source }: CsvImportRequest): Promise<ImportRowsSummary> => importRows(store, cid, result.file, {
    // GNSS fixes live inside latitude readings: replacing them changes readings, it removes none.
    replace: mode === 'replace' && table !== 'gnss-fixes' ? [RECORD_TABLES[table].collection] : [],
    expectedSeq: version, source: source || 'CSV file',
  });
  return (
    <>
      <div className="af-actions">
        <IonButton expand="block" fill="outline" onClick={() => setOpen(!open)} data-testid="open-csv-import" aria-expanded={open}>
          {open ? 'Close CSV import' : 'Import CSV'}
        </IonButton>
      </div>
      {open && file && <CsvImportPanel campaign={file} version={snapshot?.seq} onImport={onImport} />}
    </>
  );
}

export function CampaignPage() {
  const { cid = '' } = useParams();
  const { store } = useServices();
  const { settings } = useAppSettings();
  const fit = useLiveFit(cid);
  const campaign = useLiveQuery(() => getCampaign(store.db, cid), [store, cid]);
  const stations = useLiveQuery(() => stationsOf(store.db, cid), [store, cid]);
  const arcs = useLiveQuery(() => readingPage(store.db, cid, 'arc', 0, INLINE_ARCS), [store, cid]);
  const counts = useLiveQuery(async () => (await countReadings(store.db, cid, 'latitude')) + (await countReadings(store.db, cid, 'arc')), [store, cid]);
  const summaryOf = new Map((fit.result?.stations ?? []).map((s) => [s.code, s]));
  const suspectIds = new Set((fit.result?.readings ?? []).filter((r) => r.suspect && !r.excluded).map((r) => r.id));

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref="/campaigns" text="Campaigns" /></IonButtons>
          <IonTitle data-testid="campaign-title">{campaign?.record?.name ?? 'Campaign'}</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        {campaign === undefined && stations !== undefined && <p className="af-error">This campaign is not on this device.</p>}
        <LiveFitStrip campaignId={cid} />
        <div className="af-actions">
          <IonButton className="af-primary-action" expand="block" routerLink={`/campaigns/${cid}/latitude/new`} data-testid="add-latitude">Latitude reading</IonButton>
          <IonButton className="af-primary-action" expand="block" routerLink={`/campaigns/${cid}/arcs/new`} data-testid="add-arc">Arc reading</IonButton>
          <IonButton expand="block" fill="outline" routerLink={`/campaigns/${cid}/stations/new`} data-testid="add-station">Add station</IonButton>
          <IonButton expand="block" fill="outline" routerLink={`/campaigns/${cid}/fit`} data-testid="open-fit">Fit and suspects</IonButton>
          <IonButton expand="block" fill="outline" routerLink={`/campaigns/${cid}/readings`} data-testid="open-readings">All readings ({counts ?? '…'})</IonButton>
          <IonButton expand="block" fill="outline" routerLink={`/campaigns/${cid}/sync`} data-testid="open-sync">Sync</IonButton>
        </div>
        <ReportAction loadCampaign={async () => { const r = await loadCampaignRecords(store.db, cid); return r ? campaignFileOf(r) : undefined; }} />
        <CsvImportSection cid={cid} />

        <IonList data-testid="station-list">
          <IonListHeader><IonLabel>Stations ({stations?.length ?? '…'})</IonLabel></IonListHeader>
          {stations?.length === 0 && <p className="af-hint">No station yet: add one, then its readings.</p>}
          {stations?.map((s) => {
            const sum = summaryOf.get(s.code);
            const flagged = sum?.suspectReadingIds.some((id) => suspectIds.has(id));
            return (
              <IonItem key={s.id} button detail routerLink={`/campaigns/${cid}/stations/${s.id}`} data-testid="station-item">
                <IonLabel>
                  <h2>{s.code}{s.record?.name ? ` — ${s.record.name}` : ''}</h2>
                  <p>{s.record?.heightM !== undefined ? `h ${s.record.heightM} m · ` : ''}{sum ? `${sum.readingCount} ${sum.kind} reading${sum.readingCount === 1 ? '' : 's'}` : 'no readings yet'}</p>
                </IonLabel>
                {flagged && <IonNote slot="end" className="af-suspect">suspect</IonNote>}
              </IonItem>
            );
          })}
        </IonList>

        <IonList data-testid="arc-list">
          <IonListHeader><IonLabel>Arcs ({arcs?.total ?? '…'})</IonLabel></IonListHeader>
          {arcs?.rows.map((a) => a.record && (
            <IonItem key={a.id} button detail routerLink={`/campaigns/${cid}/arcs/${a.id}`} data-testid="arc-item">
              <IonLabel>
                <h2>{a.fromStation} – {a.toStation}</h2>
                <p>{formatLength(a.record.distanceM, settings.lengthUnit)} ± {formatLength(a.record.sigmaM, settings.lengthUnit)}</p>
              </IonLabel>
              {suspectIds.has(a.id) && <IonNote slot="end" className="af-suspect">suspect</IonNote>}
            </IonItem>
          ))}
          {arcs && arcs.total > INLINE_ARCS && <p className="af-hint">Showing {INLINE_ARCS} of {arcs.total}; see All readings.</p>}
        </IonList>
      </IonContent>
    </IonPage>
  );
}
