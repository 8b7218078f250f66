// Everything a screen talks to, handed down once from main.tsx: the store, the live fit, the
// update prompt, device settings and the location plugin (injected so tests and the native shell
// can swap them). No module-level state: main.tsx builds one Services object.
import { createContext, useContext } from 'react';
import type { FieldStore, StorageManagerLike } from '../../store/index.ts';
import type { GeolocationLike } from '../gnss/index.ts';
import type { AppUpdates } from '../pwa/index.ts';
import type { AppSettings } from '../settings/app-settings.ts';
import type { LiveFitHub } from './live-fit-hub.ts';

export interface Services {
  store: FieldStore;
  fits: LiveFitHub;
  updates: AppUpdates;
  geolocation: GeolocationLike;
  storage: StorageManagerLike | undefined;
  platform: string;
  buildId: string;
}

export interface SettingsHandle {
  settings: AppSettings;
  save: (patch: Partial<AppSettings>) => Promise<void>;
}

export const ServicesContext = createContext<Services | null>(null);
export const SettingsContext = createContext<SettingsHandle | null>(null);

export function useServices(): Services {
  const s = useContext(ServicesContext);
  if (!s) throw new Error('useServices: no ServicesContext provider above this component');
  return s;
}

export function useAppSettings(): SettingsHandle {
  const s = useContext(SettingsContext);
  if (!s) throw new Error('useAppSettings: no SettingsContext provider above this component');
  return s;
}
