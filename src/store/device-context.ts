// Who is writing and when: the device id (made once, kept in settings), the hybrid logical clock
// restored from its last persisted stamp (so stamps stay monotonic across restarts), the id source
// and the wall clock. Injected, so tests can freeze time and script ids (style.md §7).
import { v7 as uuidv7 } from 'uuid';
import { HybridLogicalClock } from '../sync/hlc.ts';
import type { ArcfieldDb } from './arcfield-db.ts';

export const SETTING_DEVICE_ID = 'deviceId';
export const SETTING_HLC = 'hlc';

export interface DeviceContext {
  deviceId: string;
  clock: HybridLogicalClock;
  newId: () => string;
  now: () => number;
}

export interface DeviceContextOptions {
  now?: () => number;
  newId?: () => string;
}

export async function loadDeviceContext(db: ArcfieldDb, opts: DeviceContextOptions = {}): Promise<DeviceContext> {
  const now = opts.now ?? Date.now;
  const newId = opts.newId ?? (() => uuidv7());
  const clock = new HybridLogicalClock(now);
  const deviceId = await db.transaction('rw', db.settings, async () => {
    const id = await db.settings.get(SETTING_DEVICE_ID);
    const stamp = await db.settings.get(SETTING_HLC);
    if (typeof stamp?.value === 'string') clock.restore(stamp.value);
    if (typeof id?.value === 'string') return id.value;
    const made = `dev-${newId()}`;
    await db.settings.put({ key: SETTING_DEVICE_ID, value: made });
    return made;
  });
  return { deviceId, clock, newId, now };
}
