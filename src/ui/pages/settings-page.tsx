// Device settings: fit defaults (a campaign's own settings override them), units and angle format,
// theme (dark and a high-contrast variant for direct sun), GNSS averaging gates, storage status,
// the build id, the field cautions and the legal notice.
import {
  IonBackButton, IonButtons, IonContent, IonHeader, IonInput, IonItem, IonList, IonListHeader, IonLabel, IonPage,
  IonSelect, IonSelectOption, IonTitle, IonToggle, IonToolbar,
} from '@ionic/react';
import { useEffect, useState } from 'react';
import { ESTIMATOR_IDS, LENGTH_UNIT_IDS, MODEL_IDS } from '../../campaign/records.ts';
import { ELLIPSOIDS, ELLIPSOID_IDS } from '../../geodesy/index.ts';
import { DB_SCHEMA_VERSION } from '../../store/index.ts';
import { FieldCautions, StoragePanel } from '../components/index.ts';
import { readNumberEntry } from '../entry/index.ts';
import { UNIT_LABEL } from '../format/index.ts';
import { useAppSettings, useServices } from '../live/index.ts';
import { ESTIMATOR_LABEL, MODEL_LABEL } from './fit-page.tsx';
import type { AppSettings } from '../settings/app-settings.ts';

function NumberSetting({ label, value, onValid, min, max, testId }: { label: string; value: number; onValid: (v: number) => void; min: number; max: number; testId: string }) {
  // Local text while typing; only valid values are saved (an invalid one is shown, not stored).
  // When the stored value changes from elsewhere, the text follows (React's derive-from-props pattern).
  const [text, setText] = useState(String(value));
  const [shown, setShown] = useState(value);
  if (shown !== value) {
    setShown(value);
    const typed = readNumberEntry(text, { min, max });
    if (typed.status !== 'ok' || typed.value !== value) setText(String(value));
  }
  const parsed = readNumberEntry(text, { min, max });
  return (
    <>
      <IonItem>
        <IonInput label={label} labelPlacement="stacked" inputmode="decimal" value={text} data-testid={testId}
          onIonInput={(e) => {
            const t = String(e.detail.value ?? '');
            setText(t);
            const p = readNumberEntry(t, { min, max });
            if (p.status === 'ok') onValid(p.value);
          }} />
      </IonItem>
      {parsed.status === 'error' && <p className="af-error">{label}: {parsed.reason} (not saved)</p>}
    </>
  );
}

export function SettingsPage() {
  const { settings, save } = useAppSettings();
  const { buildId, updates, platform } = useServices();
  const [error, setError] = useState<string | null>(null);
  const [upd, setUpd] = useState(updates.current);
  useEffect(() => updates.subscribe(setUpd), [updates]);
  const set = (patch: Partial<AppSettings>) => void save(patch).then(() => setError(null), (e: unknown) => setError(e instanceof Error ? e.message : String(e)));

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref="/campaigns" text="Back" /></IonButtons>
          <IonTitle>Settings</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        {error && <p className="af-error" role="alert">Settings not saved: {error}</p>}
        <IonList>
          <IonListHeader><IonLabel>Fit defaults for new campaigns</IonLabel></IonListHeader>
          <IonItem>
            <IonSelect label="Estimator" labelPlacement="stacked" interface="action-sheet" value={settings.estimator} onIonChange={(e) => set({ estimator: e.detail.value as AppSettings['estimator'] })}>
              {ESTIMATOR_IDS.map((id) => <IonSelectOption key={id} value={id}>{ESTIMATOR_LABEL[id]}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonSelect label="Model" labelPlacement="stacked" interface="action-sheet" value={settings.model} onIonChange={(e) => set({ model: e.detail.value as AppSettings['model'] })}>
              {MODEL_IDS.map((id) => <IonSelectOption key={id} value={id}>{MODEL_LABEL[id]}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonSelect label="Ellipsoid for comparison and reductions" labelPlacement="stacked" interface="action-sheet" value={settings.referenceEllipsoid}
              onIonChange={(e) => set({ referenceEllipsoid: String(e.detail.value) })}>
              {ELLIPSOID_IDS.map((id) => <IonSelectOption key={id} value={id}>{ELLIPSOIDS[id].name}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
          <NumberSetting label="Suspect threshold (robust σ)" value={settings.suspectThreshold} min={1} max={20} testId="setting-threshold" onValid={(v) => set({ suspectThreshold: v })} />

          <IonListHeader><IonLabel>Units and display</IonLabel></IonListHeader>
          <IonItem>
            <IonSelect label="Distance unit shown" labelPlacement="stacked" interface="action-sheet" value={settings.lengthUnit} onIonChange={(e) => set({ lengthUnit: e.detail.value as AppSettings['lengthUnit'] })}>
              {LENGTH_UNIT_IDS.map((u) => <IonSelectOption key={u} value={u}>{UNIT_LABEL[u]}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonSelect label="Angles shown as" labelPlacement="stacked" interface="action-sheet" value={settings.angleFormat} onIonChange={(e) => set({ angleFormat: e.detail.value as AppSettings['angleFormat'] })}>
              <IonSelectOption value="dms">degrees, minutes, seconds</IonSelectOption>
              <IonSelectOption value="decimal">decimal degrees</IonSelectOption>
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonSelect label="Theme" labelPlacement="stacked" interface="action-sheet" value={settings.theme} data-testid="setting-theme" onIonChange={(e) => set({ theme: e.detail.value as AppSettings['theme'] })}>
              <IonSelectOption value="system">as the phone</IonSelectOption>
              <IonSelectOption value="light">light</IonSelectOption>
              <IonSelectOption value="dark">dark</IonSelectOption>
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonToggle checked={settings.highContrast} data-testid="setting-high-contrast" onIonChange={(e) => set({ highContrast: e.detail.checked })}>High contrast (direct sunlight)</IonToggle>
          </IonItem>
          <IonItem>
            <IonToggle checked={settings.reduceMotion} onIonChange={(e) => set({ reduceMotion: e.detail.checked })}>Reduce motion</IonToggle>
          </IonItem>
          <IonItem>
            <IonInput label="Your name (kept on exclusions)" labelPlacement="stacked" value={settings.observer} maxlength={200}
              onIonInput={(e) => set({ observer: String(e.detail.value ?? '') })} />
          </IonItem>

          <IonListHeader><IonLabel>GNSS averaging</IonLabel></IonListHeader>
          <NumberSetting label="At least this many fixes" value={settings.gnssMinFixes} min={2} max={500} testId="setting-gnss-fixes" onValid={(v) => set({ gnssMinFixes: Math.round(v) })} />
          <NumberSetting label="Over at least (seconds)" value={settings.gnssMinSpanS} min={0} max={3600} testId="setting-gnss-span" onValid={(v) => set({ gnssMinSpanS: v })} />
          <NumberSetting label="Refuse fixes with device accuracy worse than (m)" value={settings.gnssMaxAccuracyM} min={0.1} max={500} testId="setting-gnss-accuracy" onValid={(v) => set({ gnssMaxAccuracyM: v })} />
        </IonList>

        <StoragePanel />

        <div className="af-card">
          <h2>This app</h2>
          <div className="af-row"><span>Build</span><span className="af-value af-mono" data-testid="build-id">{buildId}</span></div>
          <div className="af-row"><span>Database schema</span><span className="af-value">v{DB_SCHEMA_VERSION}</span></div>
          <div className="af-row"><span>Platform</span><span className="af-value">{platform}</span></div>
          <div className="af-row"><span>Works offline</span><span className="af-value" data-testid="offline-ready">{upd.disabled ? 'native app' : upd.offlineReady ? 'yes' : 'preparing…'}</span></div>
          {upd.error && <p className="af-error">Offline cache could not be set up: {upd.error}</p>}
        </div>

        <FieldCautions />
      </IonContent>
    </IonPage>
  );
}
