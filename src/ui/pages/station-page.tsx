// A station: its code, height and notes; its latitude readings with the station mean and spread
// from the running fit; and the north–south deflection of the vertical when both astronomic and
// geodetic readings exist (astronomic minus geodetic latitude, design.md "Station latitude").
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonLabel, IonList, IonListHeader,
  IonNote, IonPage, IonTextarea, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import type { StationRow } from '../../store/index.ts';
import { latitudeReadingsOfStation } from '../../store/index.ts';
import { LiveFitStrip, SaveStatus, useSaveState } from '../components/index.ts';
import { readNumberEntry } from '../entry/angle-entry.ts';
import { formatLatitude, formatSigned, withUncertainty } from '../format/index.ts';
import { useAppSettings, useDraft, useLiveFit, useServices } from '../live/index.ts';

interface StationDraft { code: string; name: string; height: string; notes: string }

function StationForm({ cid, row }: { cid: string; row: StationRow | null }) {
  const { store } = useServices();
  const navigate = useNavigate();
  const save = useSaveState();
  const [lastNew, setLastNew] = useState<StationRow | null>(null);
  const rec = row?.record;
  const draft = useDraft<StationDraft>(`station:${cid}:${row?.id ?? 'new'}`, {
    code: rec?.code ?? '', name: rec?.name ?? '', height: rec?.heightM !== undefined ? String(rec.heightM) : '', notes: rec?.notes ?? '',
  });
  const height = readNumberEntry(draft.value.height, { min: -500, max: 9000, unit: 'm' });
  const hasReadings = useLiveQuery(async () => (row ? (await latitudeReadingsOfStation(store.db, cid, row.code)).length > 0 : false), [store, cid, row]);

  const onSave = async () => {
    const saved = await save.run(`station ${draft.value.code.trim()}`, () => store.saveStation(cid, {
      ...(row ? { id: row.id } : {}),
      code: draft.value.code.trim(),
      ...(draft.value.name.trim() ? { name: draft.value.name.trim() } : {}),
      ...(height.status === 'ok' ? { heightM: height.value } : {}),
      ...(draft.value.notes.trim() ? { notes: draft.value.notes.trim() } : {}),
      ...(rec?.longitudeDeg !== undefined ? { longitudeDeg: rec.longitudeDeg } : {}),
    }));
    if (!saved) return;
    // A new station: the form clears for the next one ("Saved" stays in view, with a link to it).
    if (row) await draft.reset({ code: saved.code, name: saved.record?.name ?? '', height: saved.record?.heightM !== undefined ? String(saved.record.heightM) : '', notes: saved.record?.notes ?? '' });
    else { await draft.reset(); setLastNew(saved); }
  };

  return (
    <>
      {draft.restored && <p className="af-hint">Unsaved changes from earlier were restored.</p>}
      <IonList>
        <IonItem>
          <IonInput label="Station code" labelPlacement="stacked" value={draft.value.code} data-testid="station-code" readonly={Boolean(row && hasReadings)}
            placeholder="e.g. K01" onIonInput={(e) => draft.update({ code: String(e.detail.value ?? '') })} />
        </IonItem>
        {row && hasReadings && <p className="af-hint">The code is fixed once readings refer to it.</p>}
        <IonItem>
          <IonInput label="Name (optional)" labelPlacement="stacked" value={draft.value.name} onIonInput={(e) => draft.update({ name: String(e.detail.value ?? '') })} />
        </IonItem>
        <IonItem>
          <IonInput label="Height above the ellipsoid (m)" labelPlacement="stacked" inputmode="decimal" value={draft.value.height} data-testid="station-height"
            onIonInput={(e) => draft.update({ height: String(e.detail.value ?? '') })} />
        </IonItem>
        {height.status === 'error' && <p className="af-error">Height: {height.reason}</p>}
        <IonItem>
          <IonTextarea label="Notes" labelPlacement="stacked" autoGrow value={draft.value.notes} onIonInput={(e) => draft.update({ notes: String(e.detail.value ?? '') })} />
        </IonItem>
      </IonList>
      <div className="af-actions af-one">
        <IonButton className="af-primary-action" expand="block" data-testid="save-station"
          disabled={!draft.value.code.trim() || height.status === 'error' || save.state.phase === 'saving'} onClick={() => void onSave()}>
          {row ? 'Save station' : 'Add station'}
        </IonButton>
      </div>
      <SaveStatus state={save.state} />
      {lastNew && save.state.phase === 'saved' && (
        <IonButton fill="clear" onClick={() => navigate(`/campaigns/${cid}/stations/${lastNew.id}`)} data-testid="open-new-station">Open station {lastNew.code}</IonButton>
      )}
      {draft.writeError && <p className="af-error">{draft.writeError}</p>}
    </>
  );
}

export function StationPage() {
  const { cid = '', sid = '' } = useParams();
  const { store } = useServices();
  const { settings } = useAppSettings();
  const fit = useLiveFit(cid);
  const isNew = sid === 'new';
  const row = useLiveQuery(async () => (isNew ? null : (await store.db.stations.get(sid)) ?? null), [store, sid, isNew]);
  const readings = useLiveQuery(async () => (row ? latitudeReadingsOfStation(store.db, cid, row.code) : []), [store, cid, row?.code]);
  const summary = row ? fit.result?.stations.find((s) => s.code === row.code) : undefined;
  const verdict = new Map((fit.result?.readings ?? []).filter((r) => r.kind === 'latitude').map((r) => [r.id, r]));

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Campaign" /></IonButtons>
          <IonTitle>{isNew ? 'New station' : `Station ${row?.code ?? ''}`}</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        {row === undefined && <p className="af-hint">Loading…</p>}
        {row === null && !isNew && <p className="af-error">No such station on this device.</p>}
        {isNew && <StationForm key="new" cid={cid} row={null} />}
        {row && (
          <>
            <LiveFitStrip campaignId={cid} />
            <div className="af-card" data-testid="station-summary">
              <h2>Station latitude</h2>
              {summary ? (
                <>
                  <div className="af-row"><span>Mean ({summary.kind})</span><span className="af-value" data-testid="station-mean">{formatLatitude(summary.latitudeDeg, settings.angleFormat)}</span></div>
                  <div className="af-row"><span>Standard error</span><span className="af-value">{summary.sigmaArcsec.toFixed(2)}″</span></div>
                  <div className="af-row"><span>Spread of the repeats</span><span className="af-value" data-testid="station-spread">{summary.spreadArcsec.toFixed(2)}″ ({summary.readingCount} readings)</span></div>
                  {summary.deflectionNorthArcsec !== null && (
                    <div className="af-row"><span>North–south deflection (astro − GNSS)</span><span className="af-value" data-testid="station-deflection">
                      {withUncertainty(summary.deflectionNorthArcsec, summary.deflectionNorthStdArcsec, 2, '″')}</span></div>
                  )}
                  {summary.usedInFit === false && <p className="af-hint">This station has no {summary.kind === 'geodetic' ? 'astronomic' : 'geodetic'} reading of the kind the fit uses, so its arcs wait.</p>}
                </>
              ) : <p className="af-hint">{fit.phase === 'solved' ? 'No latitude readings yet.' : 'Computing…'}</p>}
            </div>
            <IonList data-testid="station-readings">
              <IonListHeader><IonLabel>Latitude readings ({readings?.length ?? '…'})</IonLabel></IonListHeader>
              {readings?.map((r) => {
                const v = verdict.get(r.id);
                return r.record && (
                  <IonItem key={r.id} button detail routerLink={`/campaigns/${cid}/latitude/${r.id}`} data-testid="station-reading">
                    <IonLabel className={v?.excluded ? 'af-excluded' : undefined}>
                      <h2>{formatLatitude(r.record.latitudeDeg, settings.angleFormat)}</h2>
                      <p>{r.record.kind} · σ {r.record.sigmaArcsec}″ · {new Date(r.record.observedAt).toLocaleString()}</p>
                      {v?.hint && <p className={v.suspect ? 'af-suspect' : undefined}>{v.hint}</p>}
                    </IonLabel>
                    {v && <IonNote slot="end" className={v.suspect ? 'af-suspect' : undefined}>{formatSigned(v.residual, 2)}″</IonNote>}
                  </IonItem>
                );
              })}
            </IonList>
            <div className="af-actions af-one">
              <IonButton className="af-primary-action" expand="block" routerLink={`/campaigns/${cid}/latitude/new?station=${encodeURIComponent(row.code)}`}
                data-testid="station-add-latitude">Latitude reading at {row.code}</IonButton>
            </div>
            <IonListHeader><IonLabel>Station details</IonLabel></IonListHeader>
            <StationForm key={row.id} cid={cid} row={row} />
          </>
        )}
      </IonContent>
    </IonPage>
  );
}
