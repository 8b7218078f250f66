import type { CapacitorConfig } from '@capacitor/cli';

// Native shell for Android and iOS. The web build (dist/) is bundled into the app; the service
// worker is not registered inside the native shell (see src/ui/register-sw.ts).
const config: CapacitorConfig = {
  appId: 'org.arcfield.field',
  appName: 'arcfield',
  webDir: 'dist',
  android: { allowMixedContent: false },
  ios: { contentInset: 'always' },
  plugins: {
    Geolocation: {},
  },
};

export default config;
