// The app shell: routes, the device settings provider (live from the store, so every screen sees a
// change at once), the theme, and the update prompt.
import { IonApp, IonRouterOutlet, setupIonicReact } from '@ionic/react';
import { IonReactRouter } from '@ionic/react-router';
import { useLiveQuery } from 'dexie-react-hooks';
import { useEffect, useMemo } from 'react';
import { Navigate, Route } from 'react-router-dom';
import { readSetting, writeSetting } from '../store/index.ts';
import { UpdatePrompt } from './components/index.ts';
import { ServicesContext, SettingsContext, type Services, type SettingsHandle } from './live/index.ts';
import {
  ArcEntryPage, CampaignPage, CampaignsPage, FitPage, LatitudeEntryPage, ReadingsPage, SettingsPage, StationPage, SyncPage,
} from './pages/index.ts';
import { AppSettingsSchema, DEFAULT_APP_SETTINGS, readAppSettings, SETTING_APP, type AppSettings } from './settings/app-settings.ts';
import { applyTheme } from './theme.ts';
import { validateRecord } from '../store/index.ts';

/** Page animations off when the person or the phone asks for reduced motion (field-traps ). */
export function animationsWanted(reduceMotion: boolean): boolean {
  return !reduceMotion && !window.matchMedia('(prefers-reduced-motion: reduce)').matches;
}

function Routes() {
  return (
    <IonReactRouter>
      <IonRouterOutlet>
        <Route path="/campaigns" element={<CampaignsPage />} />
        <Route path="/campaigns/:cid" element={<CampaignPage />} />
        <Route path="/campaigns/:cid/stations/:sid" element={<StationPage />} />
        <Route path="/campaigns/:cid/latitude/:rid" element={<LatitudeEntryPage />} />
        <Route path="/campaigns/:cid/arcs/:rid" element={<ArcEntryPage />} />
        <Route path="/campaigns/:cid/fit" element={<FitPage />} />
        <Route path="/campaigns/:cid/readings" element={<ReadingsPage />} />
        <Route path="/campaigns/:cid/sync" element={<SyncPage />} />
        <Route path="/settings" element={<SettingsPage />} />
        <Route path="/" element={<Navigate to="/campaigns" replace />} />
        <Route path="*" element={<Navigate to="/campaigns" replace />} />
      </IonRouterOutlet>
    </IonReactRouter>
  );
}

export function App({ services }: { services: Services }) {
  // Wrapped so that "still loading" (undefined) differs from "never saved" ({ value: undefined }).
  const stored = useLiveQuery(async () => ({ value: await readSetting<unknown>(services.store.db, SETTING_APP) }), [services]);
  const settings: AppSettings = useMemo(() => (stored === undefined ? DEFAULT_APP_SETTINGS : readAppSettings(stored.value)), [stored]);
  const handle: SettingsHandle = useMemo(() => ({
    settings,
    save: async (patch) => {
      const next = validateRecord(AppSettingsSchema, { ...settings, ...patch }, 'settings');
      await writeSetting(services.store.db, SETTING_APP, next);
    },
  }), [settings, services]);

  useEffect(() => applyTheme(settings), [settings]);
  useEffect(() => { setupIonicReact({ animated: animationsWanted(settings.reduceMotion) }); }, [settings.reduceMotion]);
  useEffect(() => services.fits.setSettings(settings), [services, settings]);

  return (
    <ServicesContext.Provider value={services}>
      <SettingsContext.Provider value={handle}>
        <IonApp>
          <UpdatePrompt />
          {stored === undefined ? null : <Routes />}
        </IonApp>
      </SettingsContext.Provider>
    </ServicesContext.Provider>
  );
}
