// Web app entry: open the device store, start the solve worker and the service worker (web only),
// then render. A store that cannot open is reported in words, never a blank screen.
import '@ionic/react/css/core.css';
import '@ionic/react/css/normalize.css';
import '@ionic/react/css/structure.css';
import '@ionic/react/css/typography.css';
import '@ionic/react/css/palettes/dark.class.css';
import '@ionic/react/css/palettes/high-contrast.class.css';
import '@ionic/react/css/palettes/high-contrast-dark.class.css';
import './app.css';
import { Capacitor } from '@capacitor/core';
import { Geolocation } from '@capacitor/geolocation';
import { setupIonicReact } from '@ionic/react';
import { createRoot } from 'react-dom/client';
// Modules by path, not through the folder indexes: an index re-exports modules whose top-level
// code (zod schemas, sync wiring) the first screen does not need (bench/app-size.ts measures it).
import { openFieldStore } from '../store/field-store.ts';
import { readSetting } from '../store/local-settings.ts';
import { classifyStorageError } from '../store/storage-error.ts';
import { browserStorage } from '../store/storage-status.ts';
import { SolveClient } from '../worker/solve-client.ts';
import { animationsWanted, App } from './app.tsx';
import { LiveFitHub } from './live/live-fit-hub.ts';
import { AppUpdates } from './pwa/register-app-worker.ts';
import { readAppSettings, SETTING_APP } from './settings/app-settings.ts';

declare const __ARCFIELD_BUILD_ID__: string;

async function boot(rootEl: HTMLElement): Promise<void> {
  const root = createRoot(rootEl);
  const updates = new AppUpdates();
  updates.start();
  let store;
  try {
    store = await openFieldStore();
  } catch (err) {
    const e = classifyStorageError(err, 'database', 'arcfield');
    root.render(<main style={{ padding: 16 }}><h1>arcfield cannot open its storage</h1><p>{e.reason}</p><p>({e.causeName})</p></main>);
    return;
  }
  // A newer version opened in another tab: Dexie closes this connection; say so.
  store.db.on('versionchange', () => { updates.databaseReplaced(); });
  const settings = readAppSettings(await readSetting(store.db, SETTING_APP));
  setupIonicReact({ animated: animationsWanted(settings.reduceMotion) });
  const solver = new SolveClient();
  const fits = new LiveFitHub(store.db, solver, settings);
  const services = {
    store, fits, updates, geolocation: Geolocation, storage: browserStorage(),
    platform: Capacitor.getPlatform(), buildId: __ARCFIELD_BUILD_ID__,
  };
  root.render(<App services={services} />);
}

const rootEl = document.getElementById('root');
if (!rootEl) throw new Error('index.html has no #root element');
void boot(rootEl);
