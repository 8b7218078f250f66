// The shared running fit: one solve per store change whatever the number of screens watching, the
// counts of the records that produced the answer, and a stale answer never replacing a newer one.
import { describe, expect, it } from 'vitest';
import type { CampaignRecords } from '../../src/campaign/records.ts';
import type { CampaignResult } from '../../src/campaign/result.ts';
import { openFieldStore } from '../../src/store/index.ts';
import { LiveFitHub, type LiveFit } from '../../src/ui/live/live-fit-hub.ts';
import { DEFAULT_APP_SETTINGS } from '../../src/ui/settings/app-settings.ts';
import type { SolveClient, SolveOutcome } from '../../src/worker/solve-client.ts';

function fakeSolver() {
  const calls: CampaignRecords[] = [];
  let id = 0;
  const solver = {
    solve: async (_cid: string, records: CampaignRecords): Promise<SolveOutcome> => {
      calls.push(records);
      id += 1;
      return { status: 'solved', requestId: id, result: { status: 'ok' } as unknown as CampaignResult, chart: { points: [], curve: [], xLabel: '', yLabel: '' }, solveMs: 1, roundTripMs: 2, warmStarted: false };
    },
  } as unknown as SolveClient;
  return { solver, calls };
}

const until = async (cond: () => boolean, what: string) => {
  for (let i = 0; i < 200 && !cond(); i++) await new Promise((r) => setTimeout(r, 10));
  if (!cond()) throw new Error(`timed out waiting for ${what}`);
};

describe('LiveFitHub', () => {
  it('solves once per change for any number of watchers and reports the record counts', async () => {
    const store = await openFieldStore({ name: `hub-${Math.random()}` });
    const c = await store.createCampaign({ name: 'Hub' });
    await store.saveStation(c.id, { code: 'K01' });
    const { solver, calls } = fakeSolver();
    const hub = new LiveFitHub(store.db, solver, DEFAULT_APP_SETTINGS);
    const seen: LiveFit[] = [];
    const off1 = hub.subscribe(c.id, (s) => seen.push(s));
    const off2 = hub.subscribe(c.id, () => undefined);
    await until(() => hub.current(c.id).phase === 'solved', 'first answer');
    expect(calls).toHaveLength(1);
    await store.saveLatitudeReading(c.id, { station: 'K01', kind: 'astronomic', latitudeDeg: 8.12, sigmaArcsec: 0.3, observedAt: '2031-06-14T20:00:00Z' });
    await until(() => hub.current(c.id).latitudeReadingCount === 1, 'answer after the save');
    expect(calls).toHaveLength(2);
    expect(hub.current(c.id)).toMatchObject({ phase: 'solved', latitudeReadingCount: 1, arcReadingCount: 0 });
    off1(); off2();
    await store.saveLatitudeReading(c.id, { station: 'K01', kind: 'astronomic', latitudeDeg: 8.13, sigmaArcsec: 0.3, observedAt: '2031-06-14T20:05:00Z' });
    await new Promise((r) => setTimeout(r, 100));
    expect(calls).toHaveLength(2); // nobody watching: no solve
    expect(seen.some((s) => s.phase === 'solving')).toBe(true);
  });
});
