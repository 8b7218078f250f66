// Storage error classification (walking Dexie's `.inner`) and the storage status panel's data,
// with `navigator.storage` replaced by a scripted stand-in.
import { Dexie } from 'dexie';
import { describe, expect, it } from 'vitest';
import { classifyStorageError, errorNameChain, openFieldStore, requestPersistenceOnce, storageStatus, writeSetting } from '../../src/store/index.ts';

describe('classifyStorageError', () => {
  it('finds a QuotaExceededError wrapped in an AbortError wrapped by Dexie', () => {
    const quota = new DOMException('quota', 'QuotaExceededError');
    const abort = new Dexie.AbortError('Transaction aborted', quota);
    expect(errorNameChain(abort)).toEqual(['AbortError', 'QuotaExceededError']);
    const e = classifyStorageError(abort, 'latitudeReadings', 'r-1');
    expect([e.kind, e.field, e.value, e.causeName]).toEqual(['quota', 'latitudeReadings', 'r-1', 'QuotaExceededError']);
  });

  it('names closed databases, version clashes and unknown failures separately', () => {
    expect(classifyStorageError(new Dexie.DatabaseClosedError('closed'), 't', 'x').kind).toBe('closed');
    expect(classifyStorageError(new Dexie.VersionError('newer'), 't', 'x').kind).toBe('version');
    const unknown = classifyStorageError(new Error('disk on fire'), 't', 'x');
    expect(unknown.kind).toBe('unknown');
    expect(unknown.message).toMatch(/^Not saved: /);
  });
});

describe('storage status', () => {
  it('asks for persistence once, then reports usage, quota, unsynced count and last sync', async () => {
    const store = await openFieldStore({ name: `st-${Math.random()}` });
    let asks = 0;
    const fake = {
      persisted: async () => asks > 0,
      persist: async () => { asks++; return true; },
      estimate: async () => ({ usage: 850, quota: 1000 }),
    };
    expect(await requestPersistenceOnce(store.db, fake)).toBe(true);
    expect(await requestPersistenceOnce(store.db, fake)).toBe(true);
    expect(asks).toBe(1);
    const c = await store.createCampaign({ name: 'Status' });
    await store.saveStation(c.id, { code: 'K01' });
    await writeSetting(store.db, `lastSyncAt:${c.id}`, '2031-06-14T20:00:00.000Z');
    const s = await storageStatus(store.db, fake);
    expect(s).toMatchObject({ persisted: true, persistAsked: true, usageBytes: 850, quotaBytes: 1000, nearlyFull: true, unsyncedCount: 2, lastSyncAt: '2031-06-14T20:00:00.000Z' });
  });

  it('says null (unknown) when the browser has no StorageManager', async () => {
    const store = await openFieldStore({ name: `st-${Math.random()}` });
    const s = await storageStatus(store.db, undefined);
    expect([s.persisted, s.usageBytes, s.nearlyFull, s.lastSyncAt]).toEqual([null, null, false, null]);
  });
});
