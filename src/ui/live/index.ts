// Live data for the screens: services context, the shared running fit, persistent drafts.
export { LiveFitHub, type LiveFit } from './live-fit-hub.ts';
export { ServicesContext, SettingsContext, useServices, useAppSettings, type Services, type SettingsHandle } from './services.tsx';
export { useLiveFit } from './use-live-fit.ts';
export { useDraft, type Draft } from './use-draft.ts';
