// The campaign record (name, description, solve settings) syncs like any other record when the
// server is started by `arcfield serve`, which adds its schema; only a lead may write it, and it
// must carry the campaign's own id.
import { afterAll, describe, expect, it } from 'vitest';
import { SERVER_RECORD_SCHEMAS } from '../../src/cli/serve.ts';
import { createCampaign } from '../../src/server/create-campaign.ts';
import { pushBatch } from '../../src/server/push-batch.ts';
import { putChange, stamp, tempSqlite } from './helpers/fixtures.ts';

describe('campaign records', () => {
  const db = tempSqlite();
  afterAll(() => db.cleanup());

  it('a lead may set the campaign record; an observer may not; the id must be the campaign id', async () => {
    const storage = db.open();
    await storage.migrate();
    const c = await createCampaign(storage, 'Invented arc', { campaignId: 'cmp-k' });
    const record = { id: 'cmp-k', name: 'Invented arc, season 2', settings: { estimator: 'huber', suspectThreshold: 3 }, createdAt: '2026-05-01T08:00:00Z' };
    const change = putChange(c.campaignId, 'dev-l', 'cmp-k', record, stamp(Date.UTC(2026, 4, 1)), null, 'campaign');
    const base = { campaignId: 'cmp-k', now: () => Date.UTC(2026, 4, 1), recordSchemas: SERVER_RECORD_SCHEMAS };
    expect((await pushBatch(storage, { ...base, role: 'observer' }, [change]))[0]).toMatchObject({ status: 'rejected', field: 'changes[0].recordKind' });
    const wrongId = putChange(c.campaignId, 'dev-l', 'cmp-other', { ...record, id: 'cmp-other' }, stamp(Date.UTC(2026, 4, 1)), null, 'campaign');
    expect((await pushBatch(storage, { ...base, role: 'lead' }, [wrongId]))[0]).toMatchObject({ status: 'rejected', field: 'changes[0].recordId' });
    const bad = putChange(c.campaignId, 'dev-l', 'cmp-k', { ...record, settings: { estimator: 'guesswork' } }, stamp(Date.UTC(2026, 4, 1)), null, 'campaign');
    expect((await pushBatch(storage, { ...base, role: 'lead' }, [bad]))[0]).toMatchObject({ status: 'rejected', field: 'changes[0].record.settings.estimator' });
    expect((await pushBatch(storage, { ...base, role: 'lead' }, [change]))[0]).toMatchObject({ status: 'acked', outcome: 'applied' });
    // Without the extra schema (a bare createServer) the kind is refused with a plain reason.
    const plain = putChange(c.campaignId, 'dev-l', 'cmp-k', record, stamp(Date.UTC(2026, 4, 2)), change.hlc, 'campaign');
    expect((await pushBatch(storage, { campaignId: 'cmp-k', role: 'lead', now: () => 0 }, [plain]))[0]).toMatchObject({ status: 'rejected', reason: 'this server has no schema for campaign records' });
    await storage.close();
  });
});
