// Service-worker registration for the web/PWA build, with an explicit "new version ready —
// reload" step (never a silent reload that loses a form, field-traps R-2.1). Skipped inside the
// native shell, which ships its assets in the bundle. Checks for a new version when the
// app comes back to the foreground and hourly, only while the browser believes it is online.
import { Capacitor } from '@capacitor/core';
import { registerSW } from 'virtual:pwa-register';

/** Hourly check for a new version while the app is open. */
export const UPDATE_CHECK_INTERVAL_MS = 60 * 60 * 1000;

export interface UpdateState {
  /** A new version is installed and waiting for the person's choice. */
  needReload: boolean;
  /** The shell is cached: the app will open with no signal. */
  offlineReady: boolean;
  /** Registration failed (shown in Settings; the app still works from the network). */
  error: string | null;
  /** The service worker is not used (native shell, or a browser without it). */
  disabled: boolean;
  /** Why the last check for a new version failed (usually: no connection), or null. */
  lastCheckError: string | null;
  /** Another tab opened a newer database version; this tab closed its connection. */
  databaseReplaced: boolean;
}

type Listener = (s: UpdateState) => void;

export class AppUpdates {
  private state: UpdateState = { needReload: false, offlineReady: false, error: null, disabled: false, lastCheckError: null, databaseReplaced: false };
  private listeners = new Set<Listener>();
  private applyUpdate: ((reload?: boolean) => Promise<void>) | null = null;

  get current(): UpdateState {
    return this.state;
  }

  subscribe(fn: Listener): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  /** Register the worker (web builds only). Returns false when it is not used. */
  start(): boolean {
    if (Capacitor.isNativePlatform() || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) {
      this.set({ disabled: true });
      return false;
    }
    // A page already controlled by a worker has the shell cached (onOfflineReady fires only once).
    if (navigator.serviceWorker.controller) this.set({ offlineReady: true });
    navigator.serviceWorker.addEventListener('controllerchange', () => this.set({ offlineReady: true }));
    this.applyUpdate = registerSW({
      immediate: true,
      onNeedRefresh: () => this.set({ needReload: true }),
      onOfflineReady: () => this.set({ offlineReady: true }),
      onRegisterError: (err: unknown) => this.set({ error: err instanceof Error ? err.message : String(err) }),
      onRegisteredSW: (_url: string, reg: ServiceWorkerRegistration | undefined) => {
        if (!reg) return;
        const check = () => {
          if (!navigator.onLine) return;
          reg.update().then(() => this.set({ lastCheckError: null }), (err: unknown) => this.set({ lastCheckError: err instanceof Error ? err.message : String(err) }));
        };
        document.addEventListener('visibilitychange', () => { if (document.visibilityState === 'visible') check(); });
        setInterval(check, UPDATE_CHECK_INTERVAL_MS);
      },
    });
    return true;
  }

  /**
   * The person chose "Reload": activate the waiting version, then reload once it controls the page.
   * vite-plugin-pwa reloads by itself only for updates its own registration found; one found by the
   * resume/hourly check counts as "external" there, so the reload is done here on controllerchange.
   */
  async reloadNow(): Promise<void> {
    const reg = await navigator.serviceWorker.getRegistration();
    if (!reg?.waiting) {
      window.location.reload();
      return;
    }
    navigator.serviceWorker.addEventListener('controllerchange', () => window.location.reload(), { once: true });
    await this.applyUpdate?.(true);
  }

  /** The store's connection was closed for a newer version in another tab: ask for a reload. */
  databaseReplaced(): void {
    this.set({ databaseReplaced: true });
  }

  dismiss(): void {
    this.set({ needReload: false });
  }

  private set(patch: Partial<UpdateState>): void {
    this.state = { ...this.state, ...patch };
    for (const l of this.listeners) l(this.state);
  }
}
