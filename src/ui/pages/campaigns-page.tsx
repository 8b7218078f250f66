// Start screen: the campaigns on this device (counts and last activity), a new campaign, or a
// campaign file imported as a new campaign (the whole file is checked first; nothing is stored
// from a refused file, and every problem is listed).
import {
  IonButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonLabel, IonList, IonListHeader, IonNote, IonPage,
  IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useRef, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { listCampaigns } from '../../store/campaign-queries.ts';
import { importCampaignFile } from '../../store/import-campaign.ts';
import { SaveStatus, useSaveState } from '../components/save-status.tsx';
import { formatAge } from '../format/index.ts';
import { useServices } from '../live/services.tsx';
import { useDraft } from '../live/use-draft.ts';

export function CampaignsPage() {
  const { store } = useServices();
  const navigate = useNavigate();
  const campaigns = useLiveQuery(() => listCampaigns(store.db), [store]);
  const draft = useDraft('new-campaign', { name: '', description: '' });
  const create = useSaveState();
  const imported = useSaveState();
  const fileInput = useRef<HTMLInputElement>(null);
  const [now] = useState(() => Date.now());

  const onCreate = async () => {
    const row = await create.run(`campaign “${draft.value.name.trim()}”`, () =>
      store.createCampaign({ name: draft.value.name, ...(draft.value.description.trim() ? { description: draft.value.description.trim() } : {}) }));
    if (row) {
      await draft.reset();
      navigate(`/campaigns/${row.id}`);
    }
  };

  const onDemo = async () => {
    const summary = await imported.run('the demo campaign', async () => {
      // Precached with the app shell (public/examples/), so this works with no signal.
      const res = await fetch('/examples/demo-campaign.json');
      if (!res.ok) throw new Error(`the demo file could not be read (HTTP ${res.status})`);
      return importCampaignFile(store, await res.json(), 'demo-campaign.json');
    });
    if (summary) navigate(`/campaigns/${summary.campaignId}`);
  };

  const onFile = async (file: File) => {
    const summary = await imported.run(`“${file.name}”`, async () => {
      const text = await file.text();
      let json: unknown;
      try {
        json = JSON.parse(text);
      } catch (err) {
        throw new Error(`${file.name} is not JSON: ${err instanceof Error ? err.message : String(err)}`, { cause: err });
      }
      return importCampaignFile(store, json, file.name);
    });
    if (fileInput.current) fileInput.current.value = '';
    if (summary) navigate(`/campaigns/${summary.campaignId}`);
  };

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonTitle>Campaigns</IonTitle>
          <IonButtons slot="end"><IonButton routerLink="/settings" data-testid="open-settings">Settings</IonButton></IonButtons>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        <IonList data-testid="campaign-list">
          {campaigns?.length === 0 && <p className="af-hint">No campaign on this device yet. Start one below, or import a campaign file.</p>}
          {campaigns?.map((c) => (
            <IonItem key={c.id} button detail routerLink={`/campaigns/${c.id}`} data-testid="campaign-item">
              <IonLabel>
                <h2>{c.name}</h2>
                <p>{c.stationCount} stations · {c.latitudeReadingCount} latitude · {c.arcReadingCount} arcs</p>
              </IonLabel>
              <IonNote slot="end">{formatAge(c.lastActivityMs, now)}</IonNote>
            </IonItem>
          ))}
        </IonList>

        <IonList>
          <IonListHeader><IonLabel>New campaign</IonLabel></IonListHeader>
          <IonItem>
            <IonInput label="Name" labelPlacement="stacked" value={draft.value.name} data-testid="campaign-name"
              placeholder="e.g. Ridge line 2031" onIonInput={(e) => draft.update({ name: String(e.detail.value ?? '') })} />
          </IonItem>
          <IonItem>
            <IonInput label="Description (optional)" labelPlacement="stacked" value={draft.value.description}
              onIonInput={(e) => draft.update({ description: String(e.detail.value ?? '') })} />
          </IonItem>
        </IonList>
        <div className="af-actions af-one">
          <IonButton className="af-primary-action" expand="block" disabled={!draft.value.name.trim() || create.state.phase === 'saving'}
            onClick={() => void onCreate()} data-testid="create-campaign">Create campaign</IonButton>
        </div>
        <SaveStatus state={create.state} />

        <div className="af-actions af-one">
          <IonButton expand="block" fill="outline" onClick={() => fileInput.current?.click()} data-testid="import-campaign">Import a campaign file…</IonButton>
          <IonButton expand="block" fill="clear" onClick={() => void onDemo()} data-testid="open-demo">Add the demo campaign (invented data)</IonButton>
          <input ref={fileInput} type="file" accept=".json,application/json" hidden data-testid="import-file"
            onChange={(e) => { const f = e.target.files?.[0]; if (f) void onFile(f); }} />
        </div>
        <SaveStatus state={imported.state} />
      </IonContent>
    </IonPage>
  );
}
