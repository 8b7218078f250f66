// PWA shell: service-worker registration with the reload prompt (build-time config lives in
// pwa-config.ts, imported by vite.config.ts only).
export { AppUpdates, UPDATE_CHECK_INTERVAL_MS, type UpdateState } from './register-app-worker.ts';
