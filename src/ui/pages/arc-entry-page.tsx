// Arc reading entry: from/to station, the measured distance in its unit (m, km, ft, US survey ft,
// toise — converted with src/geodesy/units.ts; the entered value and unit are kept on the record),
// its sigma in the same unit, the line's mean height and the time.
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonList, IonPage, IonSelect,
  IonSelectOption, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { LENGTH_UNIT_IDS, type LengthUnitId } from '../../campaign/records.ts';
import { fromMetres, toMetres } from '../../geodesy/index.ts';
import { requestPersistenceOnce, stationsOf, type ArcReadingRow } from '../../store/index.ts';
import { LiveFitStrip, SaveStatus, useSaveState } from '../components/index.ts';
import { fromLocalInput, readNumberEntry, toLocalInput } from '../entry/index.ts';
import { UNIT_LABEL } from '../format/index.ts';
import { useAppSettings, useDraft, useLiveFit, useServices } from '../live/index.ts';

interface ArcDraft { from: string; to: string; distance: string; sigma: string; unit: LengthUnitId; height: string; observedAt: string; method: string }

function initialDraft(row: ArcReadingRow | null, unit: LengthUnitId): ArcDraft {
  const r = row?.record;
  const u = r?.enteredDistance?.unit ?? unit;
  return {
    from: r?.fromStation ?? '', to: r?.toStation ?? '', unit: u,
    distance: r ? String(r.enteredDistance?.value ?? fromMetres(r.distanceM, u)) : '',
    sigma: r ? String(Number(fromMetres(r.sigmaM, u).toPrecision(6))) : '',
    height: r?.meanHeightM !== undefined ? String(r.meanHeightM) : '',
    observedAt: toLocalInput(r?.observedAt ? Date.parse(r.observedAt) : Date.now()), method: r?.method ?? '',
  };
}

function ArcForm({ cid, row }: { cid: string; row: ArcReadingRow | null }) {
  const { store, storage } = useServices();
  const { settings } = useAppSettings();
  const navigate = useNavigate();
  const stations = useLiveQuery(() => stationsOf(store.db, cid), [store, cid]);
  const save = useSaveState();
  const remove = useSaveState();
  const [persistError, setPersistError] = useState<string | null>(null);
  const draft = useDraft<ArcDraft>(`arc:${cid}:${row?.id ?? 'new'}`, initialDraft(row, settings.lengthUnit));
  const d = draft.value;
  const unit = UNIT_LABEL[d.unit];
  const distance = readNumberEntry(d.distance, { positive: true, unit });
  const sigma = readNumberEntry(d.sigma, { positive: true, unit });
  const height = readNumberEntry(d.height, { min: -500, max: 9000, unit: 'm' });
  const observedAt = fromLocalInput(d.observedAt);
  const same = d.from !== '' && d.from === d.to;
  const fit = useLiveFit(cid);
  const verdict = row ? fit.result?.readings.find((r) => r.id === row.id) : undefined;
  const canSave = d.from && d.to && !same && distance.status === 'ok' && sigma.status === 'ok' && height.status !== 'error' && observedAt !== null && save.state.phase !== 'saving';

  const onSave = async () => {
    if (distance.status !== 'ok' || sigma.status !== 'ok' || observedAt === null) return;
    const saved = await save.run(`arc ${d.from}–${d.to}`, () => store.saveArcReading(cid, {
      ...(row ? { id: row.id } : {}),
      fromStation: d.from, toStation: d.to,
      distanceM: toMetres(distance.value, d.unit), sigmaM: toMetres(sigma.value, d.unit),
      enteredDistance: { value: distance.value, unit: d.unit },
      ...(height.status === 'ok' ? { meanHeightM: height.value } : {}),
      observedAt,
      ...(d.method.trim() ? { method: d.method.trim() } : {}),
    }));
    if (!saved) return;
    void requestPersistenceOnce(store.db, storage).catch((err: unknown) => setPersistError(`Could not ask for protected storage: ${err instanceof Error ? err.message : String(err)}`));
    if (row) await draft.reset(initialDraft(saved, d.unit));
    else await draft.reset({ ...initialDraft(null, d.unit), from: d.to, sigma: d.sigma });
  };

  const onDelete = async () => {
    if (!row) return;
    const gone = await remove.run('arc deleted', () => store.deleteRecord('arcReading', row.id));
    if (gone) { await draft.reset(); navigate(-1); }
  };

  const stationOptions = stations?.map((s) => <IonSelectOption key={s.id} value={s.code}>{s.code}</IonSelectOption>);
  return (
    <>
      {draft.restored && <p className="af-hint" data-testid="draft-restored">Unsaved entry from earlier was restored.</p>}
      <IonList>
        <IonItem>
          <IonSelect label="From station" labelPlacement="stacked" interface="action-sheet" value={d.from} data-testid="arc-from"
            placeholder="Choose" onIonChange={(e) => draft.update({ from: String(e.detail.value ?? '') })}>{stationOptions}</IonSelect>
        </IonItem>
        <IonItem>
          <IonSelect label="To station" labelPlacement="stacked" interface="action-sheet" value={d.to} data-testid="arc-to"
            placeholder="Choose" onIonChange={(e) => draft.update({ to: String(e.detail.value ?? '') })}>{stationOptions}</IonSelect>
        </IonItem>
        {same && <p className="af-error">An arc needs two different stations.</p>}
        <IonItem>
          <IonSelect label="Unit" labelPlacement="stacked" interface="action-sheet" value={d.unit} data-testid="arc-unit"
            onIonChange={(e) => draft.update({ unit: (LENGTH_UNIT_IDS as readonly string[]).includes(String(e.detail.value)) ? e.detail.value as LengthUnitId : 'm' })}>
            {LENGTH_UNIT_IDS.map((u) => <IonSelectOption key={u} value={u}>{UNIT_LABEL[u]}</IonSelectOption>)}
          </IonSelect>
        </IonItem>
        <IonItem>
          <IonInput label={`Distance (${unit})`} labelPlacement="stacked" inputmode="decimal" value={d.distance} data-testid="arc-distance"
            onIonInput={(e) => draft.update({ distance: String(e.detail.value ?? '') })} />
        </IonItem>
        {distance.status === 'error' && <p className="af-error">Distance: {distance.reason}</p>}
        {distance.status === 'ok' && d.unit !== 'm' && <p className="af-echo">= {toMetres(distance.value, d.unit).toFixed(3)} m</p>}
        <IonItem>
          <IonInput label={`Sigma (${unit})`} labelPlacement="stacked" inputmode="decimal" value={d.sigma} data-testid="arc-sigma"
            onIonInput={(e) => draft.update({ sigma: String(e.detail.value ?? '') })} />
        </IonItem>
        {sigma.status === 'error' && <p className="af-error">Sigma: {sigma.reason}</p>}
        <IonItem>
          <IonInput label="Mean height of the line (m, optional)" labelPlacement="stacked" inputmode="decimal" value={d.height} data-testid="arc-height"
            onIonInput={(e) => draft.update({ height: String(e.detail.value ?? '') })} />
        </IonItem>
        {height.status === 'error' && <p className="af-error">Mean height: {height.reason}</p>}
        <IonItem>
          <IonInput label="Observed at (local time)" labelPlacement="stacked" type="datetime-local" step="1" value={d.observedAt}
            onIonInput={(e) => draft.update({ observedAt: String(e.detail.value ?? '') })} />
        </IonItem>
        {observedAt === null && <p className="af-error">Observed at: enter a date and time.</p>}
        <IonItem>
          <IonInput label="Method note" labelPlacement="stacked" value={d.method} maxlength={500} placeholder="e.g. baseline + triangulation chain"
            onIonInput={(e) => draft.update({ method: String(e.detail.value ?? '') })} />
        </IonItem>
      </IonList>
      <div className="af-actions af-one">
        <IonButton className="af-primary-action" expand="block" disabled={!canSave} onClick={() => void onSave()} data-testid="save-arc">
          {row ? 'Save changes' : 'Save arc'}
        </IonButton>
      </div>
      <SaveStatus state={save.state} />
      {draft.writeError && <p className="af-error">{draft.writeError}</p>}
      {persistError && <p className="af-error">{persistError}</p>}
      {verdict?.hint && <p className={verdict.suspect ? 'af-suspect af-hint' : 'af-hint'}>{verdict.hint}</p>}
      {row && (
        <div className="af-actions af-one">
          <IonButton expand="block" color="danger" fill="outline" onClick={() => void onDelete()} data-testid="delete-arc">Delete this arc</IonButton>
          <SaveStatus state={remove.state} />
        </div>
      )}
    </>
  );
}

export function ArcEntryPage() {
  const { cid = '', rid = 'new' } = useParams();
  const { store } = useServices();
  const row = useLiveQuery(async () => (rid === 'new' ? null : (await store.db.arcReadings.get(rid)) ?? null), [store, rid]);
  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Back" /></IonButtons>
          <IonTitle>{rid === 'new' ? 'Arc reading' : 'Edit arc reading'}</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        <LiveFitStrip campaignId={cid} />
        {row === undefined ? <p className="af-hint">Loading…</p> : row === null && rid !== 'new' ? <p className="af-error">No such arc on this device.</p>
          : row?.deleted ? <p className="af-error">This arc was deleted.</p> : <ArcForm key={rid} cid={cid} row={row} />}
      </IonContent>
    </IonPage>
  );
}
