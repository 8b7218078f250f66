/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import { VitePWA } from 'vite-plugin-pwa';
import { appManifest, buildId, workboxOptions } from './src/ui/pwa/pwa-config.ts';

// Web app build and unit-test configuration. PWA decisions: see DEVELOPERS.md "The field app".
export default defineConfig({
  plugins: [
    react(),
    // registerType 'prompt': a new version waits for the person's "Reload" (never a silent reload
    // that loses a form — field-traps ); src/ui/pwa/register-app-worker.ts registers it.
    VitePWA({ registerType: 'prompt', injectRegister: false, manifest: appManifest, workbox: workboxOptions }),
  ],
  define: { __ARCFIELD_BUILD_ID__: JSON.stringify(buildId()) },
  build: {
    // dist/.vite/manifest.json: the chunk import graph that bench/app-size.ts reads to size the
    // initial transfer (entry + static imports + CSS) apart from the lazily loaded chunks.
    manifest: true,
    // @ionic/core's per-component modules are side-effect free in practice but not marked so;
    // declaring them so lets the bundler drop unused components (the team notes (shared/toolchain.md) §1).
    rolldownOptions: { treeshake: { moduleSideEffects: (id: string) => !/[\\/]@ionic[\\/]core[\\/]components[\\/]ion-[^\\/]+\.js$/.test(id) } },
  },
  test: {
    environment: 'node',
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    setupFiles: ['test/setup.ts'],
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
