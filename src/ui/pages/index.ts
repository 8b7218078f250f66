// The screens.
export { CampaignsPage } from './campaigns-page.tsx';
export { CampaignPage } from './campaign-page.tsx';
export { StationPage } from './station-page.tsx';
export { LatitudeEntryPage } from './latitude-entry-page.tsx';
export { ArcEntryPage } from './arc-entry-page.tsx';
export { FitPage } from './fit-page.tsx';
export { ReadingsPage } from './readings-page.tsx';
export { SettingsPage } from './settings-page.tsx';
export { SyncPage } from './sync-page.tsx';
