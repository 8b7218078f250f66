// Latitude reading entry: the value typed in decimal degrees or sexagesimal and parsed as typed
// (the meaning, or the reason in words, under the field), sigma, kind, time and method; or a GNSS
// average. The draft is kept on every change; after a save reads back, the form is ready for the
// next repeat at the same station (no endless navigation stack, field-traps ).
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonLabel, IonList, IonPage,
  IonSegment, IonSegmentButton, IonSelect, IonSelectOption, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useState } from 'react';
import { useLocation, useNavigate, useParams } from 'react-router-dom';
import type { GnssFix, LatitudeKind, LatitudeReading } from '../../campaign/records.ts';
import { formatDecimalDeg } from '../../geodesy/index.ts';
import { requestPersistenceOnce, stationsOf, type LatitudeReadingRow } from '../../store/index.ts';
import { GnssCapturePanel, type GnssResult } from '../components/gnss-capture-panel.tsx';
import { LiveFitStrip, SaveStatus, useSaveState } from '../components/index.ts';
import { readAngleEntry, readNumberEntry } from '../entry/angle-entry.ts';
import { fromLocalInput, toLocalInput } from '../entry/local-time.ts';
import { useDraft, useLiveFit, useServices } from '../live/index.ts';

interface LatitudeDraft {
  station: string;
  kind: LatitudeKind;
  text: string;
  sigma: string;
  observedAt: string;
  method: string;
  gnssFixes: GnssFix[];
  rawFixIds: string[];
}

function initialDraft(row: LatitudeReadingRow | null, station: string): LatitudeDraft {
  const r = row?.record;
  return {
    station: r?.station ?? station, kind: r?.kind ?? 'astronomic', text: r?.enteredText ?? (r ? formatDecimalDeg(r.latitudeDeg, 8) : ''),
    sigma: r ? String(r.sigmaArcsec) : '', observedAt: toLocalInput(r ? Date.parse(r.observedAt) : Date.now()), method: r?.method ?? '',
    gnssFixes: r?.gnssFixes ?? [], rawFixIds: [],
  };
}

function LatitudeForm({ cid, row, station }: { cid: string; row: LatitudeReadingRow | null; station: string }) {
  const { store, storage } = useServices();
  const navigate = useNavigate();
  const stations = useLiveQuery(() => stationsOf(store.db, cid), [store, cid]);
  const save = useSaveState();
  const remove = useSaveState();
  const [persistError, setPersistError] = useState<string | null>(null);
  const draft = useDraft<LatitudeDraft>(`latitude:${cid}:${row?.id ?? 'new'}`, initialDraft(row, station));
  const d = draft.value;
  const angle = readAngleEntry(d.text);
  const sigma = readNumberEntry(d.sigma, { positive: true, max: 3600, unit: '″' });
  const fit = useLiveFit(cid);
  const verdict = row ? fit.result?.readings.find((r) => r.id === row.id) : undefined;
  const observedAt = fromLocalInput(d.observedAt);
  const canSave = d.station !== '' && angle.status === 'ok' && sigma.status === 'ok' && observedAt !== null && save.state.phase !== 'saving';

  const onSave = async () => {
    if (angle.status !== 'ok' || sigma.status !== 'ok' || observedAt === null) return;
    const input: Omit<LatitudeReading, 'id'> & { id?: string } = {
      ...(row ? { id: row.id } : {}),
      station: d.station, kind: d.kind, latitudeDeg: angle.latitudeDeg, sigmaArcsec: sigma.value, observedAt,
      enteredText: d.text.trim().slice(0, 100),
      ...(d.method.trim() ? { method: d.method.trim() } : {}),
      ...(d.gnssFixes.length ? { gnssFixes: d.gnssFixes } : {}),
      ...(row?.record?.observer ? { observer: row.record.observer } : {}),
    };
    const saved = await save.run(`${d.kind} latitude at ${d.station} (${angle.sexagesimal})`, () => store.saveLatitudeReading(cid, input, d.rawFixIds));
    if (!saved) return;
    // Ask for protected storage with the first saved reading (field-traps ).
    void requestPersistenceOnce(store.db, storage).catch((err: unknown) => setPersistError(`Could not ask for protected storage: ${err instanceof Error ? err.message : String(err)}`));
    if (row) await draft.reset(initialDraft(saved, d.station));
    else await draft.reset({ ...initialDraft(null, d.station), kind: d.kind, sigma: d.kind === 'astronomic' ? d.sigma : '', observedAt: toLocalInput(Date.now()) });
  };

  const onDelete = async () => {
    if (!row) return;
    const gone = await remove.run('reading deleted', () => store.deleteRecord('latitudeReading', row.id));
    if (gone) { await draft.reset(); navigate(-1); }
  };

  const onGnss = (g: GnssResult) => {
    if (g.average.latitudeDeg === null || g.average.suggestedSigmaArcsec === null) return;
    draft.update({
      kind: 'geodetic', text: formatDecimalDeg(g.average.latitudeDeg, 8),
      sigma: g.average.suggestedSigmaArcsec.toPrecision(2), gnssFixes: g.fixes, rawFixIds: g.rawFixIds,
      method: `GNSS average: ${g.average.n} fixes over ${g.average.spanS.toFixed(0)} s, scatter ${g.average.scatterM?.toFixed(2)} m, median device accuracy ±${g.average.medianAccuracyM?.toFixed(1)} m`,
    });
  };

  return (
    <>
      {draft.restored && <p className="af-hint" data-testid="draft-restored">Unsaved entry from earlier was restored.</p>}
      <IonList>
        <IonItem>
          <IonSelect label="Station" labelPlacement="stacked" value={d.station} interface="action-sheet" data-testid="latitude-station"
            placeholder="Choose a station" onIonChange={(e) => draft.update({ station: String(e.detail.value ?? '') })}>
            {stations?.map((s) => <IonSelectOption key={s.id} value={s.code}>{s.code}{s.record?.name ? ` — ${s.record.name}` : ''}</IonSelectOption>)}
          </IonSelect>
        </IonItem>
        {stations?.length === 0 && <p className="af-error">Add a station first.</p>}
        <IonItem lines="none"><IonLabel>Kind</IonLabel></IonItem>
        <IonSegment value={d.kind} onIonChange={(e) => draft.update({ kind: e.detail.value === 'geodetic' ? 'geodetic' : 'astronomic' })} data-testid="latitude-kind">
          <IonSegmentButton value="astronomic" data-testid="kind-astronomic"><IonLabel>Astronomic</IonLabel></IonSegmentButton>
          <IonSegmentButton value="geodetic" data-testid="kind-geodetic"><IonLabel>Geodetic (GNSS)</IonLabel></IonSegmentButton>
        </IonSegment>
        <IonItem>
          <IonInput label="Latitude" labelPlacement="stacked" value={d.text} data-testid="latitude-text" autocapitalize="off"
            placeholder={`41.2092361  or  41°12'33.25"N  or  41 12 33.25 N`} onIonInput={(e) => draft.update({ text: String(e.detail.value ?? '') })} />
        </IonItem>
        {angle.status === 'ok' && <p className="af-echo" data-testid="latitude-echo">= {angle.sexagesimal} = {angle.decimal}</p>}
        {angle.status === 'error' && <p className="af-error" data-testid="latitude-error">{angle.reason}</p>}
        <IonItem>
          <IonInput label="Sigma (arcseconds)" labelPlacement="stacked" inputmode="decimal" value={d.sigma} data-testid="latitude-sigma"
            placeholder="e.g. 0.3" onIonInput={(e) => draft.update({ sigma: String(e.detail.value ?? '') })} />
        </IonItem>
        {sigma.status === 'error' && <p className="af-error">Sigma: {sigma.reason}</p>}
        <IonItem>
          <IonInput label="Observed at (local time)" labelPlacement="stacked" type="datetime-local" step="1" value={d.observedAt} data-testid="latitude-time"
            onIonInput={(e) => draft.update({ observedAt: String(e.detail.value ?? '') })} />
        </IonItem>
        {observedAt === null && <p className="af-error">Observed at: enter a date and time.</p>}
        <IonItem>
          <IonInput label="Method note" labelPlacement="stacked" value={d.method} placeholder="e.g. zenith pair, 8 stars" maxlength={500}
            onIonInput={(e) => draft.update({ method: String(e.detail.value ?? '') })} />
        </IonItem>
        {d.gnssFixes.length > 0 && <p className="af-hint">{d.gnssFixes.length} GNSS fixes are attached (kept with the reading).</p>}
      </IonList>
      <div className="af-actions af-one">
        <IonButton className="af-primary-action" expand="block" disabled={!canSave} onClick={() => void onSave()} data-testid="save-latitude">
          {row ? 'Save changes' : 'Save reading'}
        </IonButton>
      </div>
      <SaveStatus state={save.state} />
      {draft.writeError && <p className="af-error">{draft.writeError}</p>}
      {persistError && <p className="af-error">{persistError}</p>}
      {verdict?.hint && <p className={verdict.suspect ? 'af-suspect af-hint' : 'af-hint'}>{verdict.hint}</p>}
      <GnssCapturePanel campaignId={cid} onUse={onGnss} />
      {row && (
        <div className="af-actions af-one">
          <IonButton expand="block" color="danger" fill="outline" onClick={() => void onDelete()} data-testid="delete-latitude">Delete this reading</IonButton>
          <SaveStatus state={remove.state} />
        </div>
      )}
    </>
  );
}

export function LatitudeEntryPage() {
  const { cid = '', rid = 'new' } = useParams();
  const { search } = useLocation();
  const { store } = useServices();
  const station = new URLSearchParams(search).get('station') ?? '';
  const row = useLiveQuery(async () => (rid === 'new' ? null : (await store.db.latitudeReadings.get(rid)) ?? null), [store, rid]);
  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Back" /></IonButtons>
          <IonTitle>{rid === 'new' ? 'Latitude reading' : 'Edit latitude reading'}</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        <LiveFitStrip campaignId={cid} />
        {row === undefined ? <p className="af-hint">Loading…</p> : row === null && rid !== 'new' ? <p className="af-error">No such reading on this device.</p>
          : row?.deleted ? <p className="af-error">This reading was deleted.</p>
            : <LatitudeForm key={`${rid}:${station}`} cid={cid} row={row} station={station} />}
      </IonContent>
    </IonPage>
  );
}
