// The campaign page's CSV import as the page wires it (snapshot → the panel's CSV check → importRows
// with the snapshot's position): the running fit picks the imported readings up through the change
// log alone — one new solve with every imported reading in it — and a replace removes readings
// from the fit. The fit itself is a stand-in here; this checks what reaches it.
import { describe, expect, it } from 'vitest';
import type { CampaignRecords } from '../../src/campaign/records.ts';
import type { CampaignResult } from '../../src/campaign/result.ts';
import { importCsvTable } from '../../src/io/index.ts';
import { importRows, loadCampaignSnapshot, openFieldStore } from '../../src/store/index.ts';
import { campaignFileOf } from '../../src/ui/decisions/campaign-file-of.ts';
import { LiveFitHub } from '../../src/ui/live/live-fit-hub.ts';
import { DEFAULT_APP_SETTINGS } from '../../src/ui/settings/app-settings.ts';
import type { SolveClient, SolveOutcome } from '../../src/worker/solve-client.ts';

function fakeSolver() {
  const calls: CampaignRecords[] = [];
  const solver = {
    solve: async (_cid: string, records: CampaignRecords): Promise<SolveOutcome> => {
      calls.push(records);
      return { status: 'solved', requestId: calls.length, result: { status: 'ok' } as unknown as CampaignResult, chart: { points: [], curve: [], xLabel: '', yLabel: '' }, solveMs: 1, roundTripMs: 2, warmStarted: false };
    },
  } as unknown as SolveClient;
  return { solver, calls };
}

const until = async (cond: () => boolean, what: string) => {
  for (let i = 0; i < 300 && !cond(); i++) await new Promise((r) => setTimeout(r, 10));
  if (!cond()) throw new Error(`timed out waiting for ${what}`);
};

const CSV = [
  'station,kind,latitude_deg,sigma_arcsec,observed_at',
  'K01,astronomic,8.1200010,0.25,2031-06-15T20:00:00Z',
  'K02,astronomic,12.8610440,0.30,2031-06-16T20:00:00Z',
].join('\r\n') + '\r\n';

describe('CSV import and the live fit', () => {
  it('the running fit sees the imported readings, and a replace removes them again', async () => {
    const store = await openFieldStore({ name: `csv-fit-${Math.random()}` });
    const c = await store.createCampaign({ name: 'Import fit' });
    await store.saveStation(c.id, { code: 'K01' });
    await store.saveStation(c.id, { code: 'K02' });
    await store.saveLatitudeReading(c.id, { station: 'K01', kind: 'astronomic', latitudeDeg: 8.12, sigmaArcsec: 0.3, observedAt: '2031-06-14T20:00:00Z' });
    const { solver, calls } = fakeSolver();
    const hub = new LiveFitHub(store.db, solver, DEFAULT_APP_SETTINGS);
    const off = hub.subscribe(c.id, () => undefined);
    await until(() => hub.current(c.id).phase === 'solved', 'first answer');
    expect(hub.current(c.id).latitudeReadingCount).toBe(1);

    let n = 0;
    const newId = () => `csv-${++n}`;
    const snap = (await loadCampaignSnapshot(store.db, c.id))!;
    const checked = importCsvTable(campaignFileOf(snap.records), CSV, { table: 'latitude', newId, source: 'extra.csv' });
    const solvesBefore = calls.length;
    await importRows(store, c.id, checked.file, { expectedSeq: snap.seq, source: 'extra.csv' });
    await until(() => hub.current(c.id).latitudeReadingCount === 3, 'answer after the import');
    // One transaction, one change-log move: the whole import reaches the fit at once, never half of it.
    expect(calls.slice(solvesBefore).map((r) => r.latitudeReadings.length)).toEqual([3]);
    expect(calls[calls.length - 1].latitudeReadings.map((r) => r.id).sort()).toEqual(['csv-1', 'csv-2', expect.any(String)].sort());

    const snap2 = (await loadCampaignSnapshot(store.db, c.id))!;
    const onlyOne = 'station,kind,latitude_deg,sigma_arcsec,observed_at\r\nK02,astronomic,12.8610440,0.30,2031-06-16T20:00:00Z\r\n';
    const replaced = importCsvTable(campaignFileOf(snap2.records), onlyOne, { table: 'latitude', mode: 'replace', newId });
    await importRows(store, c.id, replaced.file, { replace: ['latitudeReadings'], expectedSeq: snap2.seq });
    await until(() => hub.current(c.id).latitudeReadingCount === 1, 'answer after the replace');
    expect(calls[calls.length - 1].latitudeReadings.map((r) => r.id)).toEqual(['csv-3']);
    off();
  });
});
