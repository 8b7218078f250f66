// Browser wiring of the sync client, kept apart so the client itself stays free of globals:
// the Web Locks lock (one tab syncs at a time, field-traps) and the triggers (resume via
// visibilitychange, the online event). Nothing is installed at import; call attach and keep the
// returned detach for unmount.
import type { LockFn, SyncClient } from './sync-client.ts';

interface LockManagerLike {
  request(name: string, options: { ifAvailable: boolean }, cb: (lock: unknown) => Promise<'ran' | 'busy'>): Promise<'ran' | 'busy'>;
}

/** A LockFn over navigator.locks; without Web Locks (old WebViews) it runs directly. */
export function webLocks(locks: LockManagerLike | undefined): LockFn {
  if (!locks) return async (_name, fn) => {
    await fn();
    return 'ran';
  };
  return (name, fn) => locks.request(name, { ifAvailable: true }, async (lock) => {
    if (lock === null) return 'busy';
    await fn();
    return 'ran';
  });
}

interface EventTargetLike {
  addEventListener(type: string, fn: () => void): void;
  removeEventListener(type: string, fn: () => void): void;
}

/**
 * Start the client and trigger a cycle on `online` and whenever the page becomes visible; stop
 * the foreground timer while hidden (the loop runs only in the foreground). Returns detach.
 */
export function attachBrowserTriggers(client: SyncClient, win: EventTargetLike, doc: EventTargetLike & { visibilityState: string }): () => void {
  const onOnline = () => client.trigger('online');
  const onVisibility = () => {
    if (doc.visibilityState === 'visible') {
      client.start('resume');
    } else {
      client.stop();
    }
  };
  win.addEventListener('online', onOnline);
  doc.addEventListener('visibilitychange', onVisibility);
  if (doc.visibilityState === 'visible') client.start();
  return () => {
    win.removeEventListener('online', onOnline);
    doc.removeEventListener('visibilitychange', onVisibility);
    client.stop();
  };
}
