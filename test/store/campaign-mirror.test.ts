// The incremental copy of a campaign used by the running fit must always equal a full read of the
// store (loadCampaignRecords, the reference here) after saves, edits, deletes, exclusions and
// pulled changes — compared as sets, since the solver does not depend on record order.
import { describe, expect, it } from 'vitest';
import type { CampaignRecords } from '../../src/campaign/records.ts';
import { CampaignMirror, DexieSyncStore, lastChangeSeq, loadCampaignRecords, openFieldStore } from '../../src/store/index.ts';
import { PROTOCOL_VERSION } from '../../src/sync/protocol.ts';

const byId = <T extends { id?: string; code?: string }>(xs: readonly T[]) => [...xs].sort((a, b) => String(a.id ?? a.code).localeCompare(String(b.id ?? b.code)));
function normal(r: CampaignRecords | undefined) {
  if (!r) return r;
  return { ...r, stations: byId(r.stations), latitudeReadings: byId(r.latitudeReadings), arcReadings: byId(r.arcReadings), exclusions: byId(r.exclusions ?? []) };
}

describe('CampaignMirror', () => {
  it('follows every kind of write through the change log and equals a full read', async () => {
    const store = await openFieldStore({ name: `mirror-${Math.random()}` });
    const c = await store.createCampaign({ name: 'Mirror' });
    const mirror = new CampaignMirror(store.db, c.id);
    const check = async (label: string, expectChanged: boolean) => {
      const { records, changed } = await mirror.refresh();
      expect(normal(records), label).toEqual(normal(await loadCampaignRecords(store.db, c.id)));
      expect(changed, `${label}: changed`).toBe(expectChanged);
    };
    await check('empty campaign (first, full read)', true);
    await check('nothing new', false);
    await store.saveStation(c.id, { code: 'K01' });
    await store.saveStation(c.id, { code: 'K02' });
    const r1 = await store.saveLatitudeReading(c.id, { station: 'K01', kind: 'astronomic', latitudeDeg: 8.12, sigmaArcsec: 0.3, observedAt: '2031-06-14T20:00:00Z' });
    const arc = await store.saveArcReading(c.id, { fromStation: 'K01', toStation: 'K02', distanceM: 524885.3, sigmaM: 1.1 });
    await check('after saves', true);
    await store.saveLatitudeReading(c.id, { ...r1.record!, sigmaArcsec: 0.4 });
    await store.excludeReading(c.id, arc.id, 'test', 'crew');
    await check('after an edit and an exclusion', true);
    await store.undoExclusion(c.id, arc.id);
    await store.deleteRecord('latitudeReading', r1.id);
    await store.updateCampaign(c.id, { settings: { estimator: 'tukey' } });
    await check('after undo, delete and a settings change', true);
    const sync = new DexieSyncStore(store.db, store.ctx);
    const seq = await lastChangeSeq(store.db, c.id);
    await sync.applyPulled(c.id, [{
      changeId: 'remote-1', campaignId: c.id, recordKind: 'station', recordId: 'stn-remote', op: 'put',
      record: { id: 'stn-remote', code: 'K03' }, hlc: store.ctx.clock.tick(), deviceId: 'dev-other', baseHlc: null,
      protocolVersion: PROTOCOL_VERSION, serverSeq: 1, receivedAt: '2031-06-14T21:00:00.000Z',
    }], 1);
    expect(await lastChangeSeq(store.db, c.id)).toBeGreaterThan(seq);
    await check('after a pulled change', true);
    await store.db.changes.where('changeId').anyOf(['remote-1']).modify({ state: 'acked' });
    await check('a change-log state update moves no record', false);
    const fresh = new CampaignMirror(store.db, c.id);
    expect(normal((await fresh.refresh()).records)).toEqual(normal((await mirror.refresh()).records));
  });
});
