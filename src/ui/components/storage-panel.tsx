// Is the data safe on this phone? Protection, usage against quota, unsynced changes, last sync
// (field-traps ). Refreshed live when the change log moves, and on a timer for
// the usage estimate and the "ago" text.
import { useLiveQuery } from 'dexie-react-hooks';
import { useEffect, useState } from 'react';
import { storageStatus, type StorageStatus } from '../../store/index.ts';
import { formatAge, formatBytes } from '../format/index.ts';
import { useServices } from '../live/index.ts';

const REFRESH_MS = 30_000;

function isStandalone(): boolean {
  if (typeof window === 'undefined') return false;
  return window.matchMedia?.('(display-mode: standalone)').matches || (navigator as Navigator & { standalone?: boolean }).standalone === true;
}

export function StoragePanel() {
  const { store, storage } = useServices();
  const [tick, setTick] = useState(0);
  const [now, setNow] = useState(() => Date.now());
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    const t = setInterval(() => { setTick((n) => n + 1); setNow(Date.now()); }, REFRESH_MS);
    return () => clearInterval(t);
  }, []);
  const status = useLiveQuery<StorageStatus | null>(async () => {
    try {
      const s = await storageStatus(store.db, storage);
      setError(null);
      return s;
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
      return null;
    }
  }, [store, storage, tick]);
  const usage = status?.usageBytes ?? null;
  const quota = status?.quotaBytes ?? null;
  return (
    <div className="af-card" data-testid="storage-panel">
      <h2>Storage on this device</h2>
      {error && <p className="af-error">Storage status unavailable: {error}</p>}
      <div className="af-row"><span>Protected from clean-up</span><span className="af-value" data-testid="storage-persisted">
        {status?.persisted === null || status === undefined || status === null ? 'unknown' : status.persisted ? 'yes' : 'no'}</span></div>
      {status && status.persisted === false && (
        <p className="af-hint">The browser may delete this app&apos;s data when space runs low. {status.persistAsked ? 'Protection was asked for and refused:' : 'Protection is asked for with the first saved reading.'} Install the app to the home screen and sync often.</p>
      )}
      <div className="af-row"><span>Installed app</span><span className="af-value">{isStandalone() ? 'yes' : 'no (browser tab)'}</span></div>
      <div className="af-row"><span>Used / available</span><span className="af-value">{formatBytes(usage)} of {formatBytes(quota)}</span></div>
      {status?.nearlyFull && <p className="af-error">Storage is over 80 % full: sync or export, then free space.</p>}
      <div className="af-row"><span>Changes not yet synced</span><span className="af-value" data-testid="storage-unsynced">{status?.unsyncedCount ?? '…'}</span></div>
      {status && status.rejectedCount > 0 && <div className="af-row"><span>Refused by the server</span><span className="af-value af-suspect">{status.rejectedCount}</span></div>}
      <div className="af-row"><span>Last sync</span><span className="af-value">{status ? formatAge(status.lastSyncAt ? Date.parse(status.lastSyncAt) : null, now) : '…'}</span></div>
    </div>
  );
}
