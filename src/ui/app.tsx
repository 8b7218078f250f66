// The app shell: routes, the device settings provider (live from the store, so every screen sees a
// change at once), the theme, and the update prompt.
import { IonApp, IonRouterOutlet, setupIonicReact } from '@ionic/react';
import { IonReactRouter } from '@ionic/react-router';
import { useLiveQuery } from 'dexie-react-hooks';
import { Suspense, useEffect, useMemo, type ReactNode } from 'react';
import { Navigate, Route } from 'react-router-dom';
// Modules by path rather than folder indexes, as in main.tsx (keeps the first chunk small).
import { readSetting, updateSetting } from '../store/local-settings.ts';
import { UpdatePrompt } from './components/update-prompt.tsx';
import { ServicesContext, SettingsContext, type Services, type SettingsHandle } from './live/services.tsx';
import {
  ArcEntryPage, CampaignPage, CampaignsPage, FitPage, LatitudeEntryPage, ReadingsPage, SettingsPage, StationPage, SyncPage,
} from './pages/index.ts';
import { DEFAULT_APP_SETTINGS, readAppSettings, SETTING_APP, type AppSettings } from './settings/app-settings.ts';
import { loadAppSettingsCheck } from './settings/check-app-settings.ts';
import { applyTheme } from './theme.ts';

/** Page animations off when the person or the phone asks for reduced motion (field-traps ). */
export function animationsWanted(reduceMotion: boolean): boolean {
  return !reduceMotion && !window.matchMedia('(prefers-reduced-motion: reduce)').matches;
}

/**
 * A lazily loaded screen. The fallback is nothing: the router outlet keeps the current page shown
 * until the new page's IonPage mounts, and then runs the transition.
 */
function Lazy({ children }: { children: ReactNode }) {
  return <Suspense fallback={null}>{children}</Suspense>;
}

function Routes() {
  return (
    <IonReactRouter>
      <IonRouterOutlet>
        <Route path="/campaigns" element={<CampaignsPage />} />
        <Route path="/campaigns/:cid" element={<Lazy><CampaignPage /></Lazy>} />
        <Route path="/campaigns/:cid/stations/:sid" element={<Lazy><StationPage /></Lazy>} />
        <Route path="/campaigns/:cid/latitude/:rid" element={<Lazy><LatitudeEntryPage /></Lazy>} />
        <Route path="/campaigns/:cid/arcs/:rid" element={<Lazy><ArcEntryPage /></Lazy>} />
        <Route path="/campaigns/:cid/fit" element={<Lazy><FitPage /></Lazy>} />
        <Route path="/campaigns/:cid/readings" element={<Lazy><ReadingsPage /></Lazy>} />
        <Route path="/campaigns/:cid/sync" element={<Lazy><SyncPage /></Lazy>} />
        <Route path="/settings" element={<Lazy><SettingsPage /></Lazy>} />
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
      // The patch goes over the stored settings inside one transaction (not over this render's
      // copy): a second edit made before the first is written must not undo it.
      const check = await loadAppSettingsCheck();
      await updateSetting(services.store.db, SETTING_APP, (stored) => check({ ...readAppSettings(stored), ...patch }));
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
