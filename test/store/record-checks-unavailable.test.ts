// The record schemas load with the first write (src/store/load-record-checks.ts). Should that
// chunk fail to load (an update half-installed, a broken cache), a write is refused with a typed
// error naming what was being saved, and nothing is stored: no row, no change-log row.
import { describe, expect, it, vi } from 'vitest';
import { openFieldStore } from '../../src/store/field-store.ts';
import { importCampaignFile } from '../../src/store/import-campaign.ts';
import { RecordChecksUnavailableError } from '../../src/store/load-record-checks.ts';

vi.mock('../../src/store/record-checks.ts', () => {
  throw new TypeError('Failed to fetch dynamically imported module');
});

describe('record checks that cannot load', () => {
  it('refuse every write with RecordChecksUnavailableError and store nothing', async () => {
    let n = 0;
    const store = await openFieldStore({ name: `rcu-${Math.random()}`, newId: () => `id-${++n}`, now: () => Date.UTC(2031, 5, 14) });
    const err: unknown = await store.createCampaign({ name: 'Ridge test' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(RecordChecksUnavailableError);
    const e = err as RecordChecksUnavailableError;
    expect(e.field).toBe('campaign');
    expect(e.value).toMatch(/^id-\d+$/); // the new campaign's id (the device id took the first)
    expect(e.reason).toMatch(/nothing was saved/);
    expect(e.message).toMatch(/^Not saved: /);

    const fileErr: unknown = await importCampaignFile(store, { format: 'arcfield-campaign' }, 'k-file.json').catch((x: unknown) => x);
    expect(fileErr).toBeInstanceOf(RecordChecksUnavailableError);
    expect((fileErr as RecordChecksUnavailableError).value).toBe('k-file.json');

    expect(await store.db.campaigns.count()).toBe(0);
    expect(await store.db.changes.count()).toBe(0);
    store.db.close();
  });
});
