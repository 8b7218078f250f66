// Sync of one campaign with the crew's server: the client loop from src/sync over this device's
// store (DexieSyncStore), its state in words (pending, last success, last error, conflicts), and a
// "Sync now". The loop runs while this screen is open (one tab at a time, Web Locks).
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonLabel, IonList, IonListHeader,
  IonPage, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useEffect, useMemo, useState } from 'react';
import { useParams } from 'react-router-dom';
import { DexieSyncStore, readSetting, writeSetting } from '../../store/index.ts';
import { attachBrowserTriggers, INITIAL_SYNC_STATE, SyncClient, webLocks, type SyncState } from '../../sync/index.ts';
import { formatAge } from '../format/index.ts';
import { useServices } from '../live/index.ts';

const SETTING_SERVER = 'syncServer';
const tokenKey = (cid: string) => `syncToken:${cid}`;

export function SyncPage() {
  const { cid = '' } = useParams();
  const { store, buildId } = useServices();
  const syncStore = useMemo(() => new DexieSyncStore(store.db, store.ctx), [store]);
  const saved = useLiveQuery(async () => ({
    server: (await readSetting<string>(store.db, SETTING_SERVER)) ?? '',
    token: (await readSetting<string>(store.db, tokenKey(cid))) ?? '',
  }), [store, cid]);
  const [state, setState] = useState<SyncState>(INITIAL_SYNC_STATE);
  const [now, setNow] = useState(() => Date.now());
  const [error, setError] = useState<string | null>(null);
  const conflicts = useLiveQuery(() => syncStore.conflicts(cid), [syncStore, cid]);

  const client = useMemo(() => saved && new SyncClient({
    serverUrl: saved.server, campaignId: cid, deviceId: store.deviceId, store: syncStore, clock: store.ctx.clock,
    token: () => saved.token || null, fetch: (input, init) => fetch(input, init),
    lock: webLocks((navigator as Navigator & { locks?: Parameters<typeof webLocks>[0] }).locks),
    clientVersion: buildId.split('+')[0],
  }), [saved, cid, store, syncStore, buildId]);

  useEffect(() => {
    if (!client) return;
    const unsub = client.subscribe((s) => { setState(s); setNow(Date.now()); });
    const detach = attachBrowserTriggers(client, window, document);
    return () => { detach(); unsub(); };
  }, [client]);

  const save = (key: string, value: string) => void writeSetting(store.db, key, value).then(() => setError(null), (e: unknown) => setError(String(e)));
  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Campaign" /></IonButtons>
          <IonTitle>Sync</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        <div className="af-card" data-testid="sync-state" data-status={state.status}>
          <h2>{state.status === 'synced' ? 'Up to date' : state.status === 'syncing' ? 'Syncing…' : state.status === 'needs-attention' ? 'Needs attention' : 'Not connected'}</h2>
          <div className="af-row"><span>Connection</span><span className="af-value">{state.connectivity}</span></div>
          <div className="af-row"><span>Changes waiting to go up</span><span className="af-value">{state.unsynced}</span></div>
          {state.rejected > 0 && <div className="af-row"><span>Refused by the server</span><span className="af-value af-suspect">{state.rejected}</span></div>}
          <div className="af-row"><span>Last successful sync</span><span className="af-value">{formatAge(state.lastSuccessAt ? Date.parse(state.lastSuccessAt) : null, now)}</span></div>
          {state.lastError && <p className="af-error">{state.lastError.message}</p>}
          {state.appOutOfDate && <p className="af-error">This app is out of date for the server: reload to update.</p>}
          {state.clockWarning && <p className="af-error">This phone&apos;s clock differs from the server&apos;s by {Math.round((state.clockOffsetMs ?? 0) / 1000)} s: set the time automatically.</p>}
        </div>
        <div className="af-actions af-one">
          <IonButton className="af-primary-action" expand="block" disabled={!client} onClick={() => void client?.syncNow()} data-testid="sync-now">Sync now</IonButton>
        </div>
        {error && <p className="af-error">{error}</p>}
        <IonList>
          <IonListHeader><IonLabel>Server</IonLabel></IonListHeader>
          <IonItem>
            <IonInput label="Server address (empty = this site)" labelPlacement="stacked" value={saved?.server ?? ''} inputmode="url"
              onIonChange={(e) => save(SETTING_SERVER, String(e.detail.value ?? '').trim())} />
          </IonItem>
          <IonItem>
            <IonInput label="Crew token" labelPlacement="stacked" type="password" value={saved?.token ?? ''}
              onIonChange={(e) => save(tokenKey(cid), String(e.detail.value ?? '').trim())} />
          </IonItem>
        </IonList>
        <IonList>
          <IonListHeader><IonLabel>Conflicts ({conflicts?.filter((c) => c.status === 'open').length ?? 0} open)</IonLabel></IonListHeader>
          {conflicts?.length === 0 && <p className="af-hint">No conflicting edits.</p>}
          {conflicts?.map((c) => (
            <IonItem key={c.conflictId}>
              <IonLabel>
                <h2>{c.recordKind} {c.recordId.slice(-8)} — {c.reason.replace(/-/g, ' ')}</h2>
                <p>{c.status === 'open' ? 'open: a crew lead resolves it' : `resolved ${c.resolvedAt ?? ''}`}</p>
              </IonLabel>
            </IonItem>
          ))}
        </IonList>
      </IonContent>
    </IonPage>
  );
}
