// The screens. The campaign list is the first screen and stays in the initial bundle; every other
// screen is its own chunk, fetched when its route is first shown (the service worker precaches
// them all, so they open offline). Render the lazy ones inside <Suspense>.
import { lazy } from 'react';

export { CampaignsPage } from './campaigns-page.tsx';

export const CampaignPage = lazy(() => import('./campaign-page.tsx').then((m) => ({ default: m.CampaignPage })));
export const StationPage = lazy(() => import('./station-page.tsx').then((m) => ({ default: m.StationPage })));
export const LatitudeEntryPage = lazy(() => import('./latitude-entry-page.tsx').then((m) => ({ default: m.LatitudeEntryPage })));
export const ArcEntryPage = lazy(() => import('./arc-entry-page.tsx').then((m) => ({ default: m.ArcEntryPage })));
export const FitPage = lazy(() => import('./fit-page.tsx').then((m) => ({ default: m.FitPage })));
export const ReadingsPage = lazy(() => import('./readings-page.tsx').then((m) => ({ default: m.ReadingsPage })));
export const SettingsPage = lazy(() => import('./settings-page.tsx').then((m) => ({ default: m.SettingsPage })));
export const SyncPage = lazy(() => import('./sync-page.tsx').then((m) => ({ default: m.SyncPage })));
