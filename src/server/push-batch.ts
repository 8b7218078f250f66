// Push: the server half of the sync promise. Each change is validated (validate-change.ts), then
// the whole batch is applied in ONE transaction of the storage adapter: dedupe by change id (a
// replay gets its original outcome), merge with the shared rules (src/sync/merge.ts), keep the
// losing side of a concurrent edit as a conflict, assign server sequences — and only after the
// commit returns are the acknowledgements sent. A throw anywhere rolls the whole batch back.
import { type ConflictReason, type ConflictRecord } from '../sync/conflict.ts';
import { parseHlc } from '../sync/hlc.ts';
import { mergeChange, versionOf, type MergeDecision } from '../sync/merge.ts';
import { FAR_FUTURE_MS, type Change, type CrewRole } from '../sync/protocol.ts';
import type { MergeOutcome, PushResult } from '../sync/wire.ts';
import type { PushTx, StoredChange, SyncStorage } from './storage.ts';
import { checkChange, type RecordSchemas } from './validate-change.ts';

export interface PushContext {
  campaignId: string;
  role: CrewRole;
  /** Server clock (injected for tests). */
  now: () => number;
  /** Record schemas (default: RECORD_SCHEMAS of src/campaign/records.ts). */
  recordSchemas?: RecordSchemas;
  /** Test hook: called after each change is applied inside the transaction (a throw = a crash mid-batch). */
  duringPush?: (index: number) => void;
}

export class CampaignNotFoundError extends Error {
  override name = 'CampaignNotFoundError';
}

const OUTCOME: Record<MergeDecision['action'], MergeOutcome> = {
  apply: 'applied', ignore: 'ignored', conflict: 'conflict', 'tombstone-wins': 'tombstoned',
};

function conflictReason(d: MergeDecision): ConflictReason {
  if (d.action === 'tombstone-wins') return 'edit-after-delete';
  if (d.action === 'apply' && d.reason === 'delete') return 'edited-while-deleted';
  return 'concurrent-edit';
}

function ackOf(c: StoredChange, duplicate: boolean): PushResult {
  return { status: 'acked', changeId: c.changeId, serverSeq: c.serverSeq, outcome: c.outcome, duplicate, flags: c.clockSkewFlag ? ['clock-ahead'] : [] };
}

export async function pushBatch(storage: SyncStorage, ctx: PushContext, rawChanges: readonly unknown[]): Promise<PushResult[]> {
  const checked = rawChanges.map((raw, i) => checkChange(raw, i, ctx.role, ctx.recordSchemas));
  return storage.pushTransaction(async (tx) => {
    const campaign = await tx.lockCampaign(ctx.campaignId);
    if (!campaign) throw new CampaignNotFoundError(ctx.campaignId);
    let lastSeq = campaign.lastSeq;
    const results: PushResult[] = [];
    for (let i = 0; i < checked.length; i++) {
      const item = checked[i];
      if (!item.ok) {
        results.push(item.rejection);
        continue;
      }
      const { change, contentHash } = item;
      const existing = await tx.findChange(change.changeId);
      if (existing) {
        results.push(existing.campaignId === ctx.campaignId && existing.contentHash === contentHash
          ? ackOf(existing, true)
          : { status: 'rejected', changeId: change.changeId, field: `changes[${i}].changeId`, reason: 'this change id was already used for a different change' });
        continue;
      }
      const unknown = await unknownConflicts(tx, ctx.campaignId, change.resolves ?? []);
      if (unknown.length > 0) {
        results.push({ status: 'rejected', changeId: change.changeId, field: `changes[${i}].resolves`, reason: `no conflict ${unknown.join(', ')} in this campaign` });
        continue;
      }
      lastSeq += 1;
      const stored = await applyOne(tx, ctx, change, contentHash, lastSeq);
      results.push(ackOf(stored, false));
      ctx.duringPush?.(i);
    }
    if (lastSeq !== campaign.lastSeq) await tx.setLastSeq(ctx.campaignId, lastSeq);
    return results;
  });
}

async function unknownConflicts(tx: PushTx, campaignId: string, ids: readonly string[]): Promise<string[]> {
  const missing: string[] = [];
  for (const id of ids) {
    const c = await tx.findConflict(id);
    if (!c || c.campaignId !== campaignId) missing.push(id);
  }
  return missing;
}

async function applyOne(tx: PushTx, ctx: PushContext, change: Change, contentHash: string, seq: number): Promise<StoredChange> {
  const nowMs = ctx.now();
  const receivedAt = new Date(nowMs).toISOString();
  const current = await tx.findRecord(ctx.campaignId, change.recordKind, change.recordId);
  const decision = mergeChange(current?.version ?? null, change);

  if (decision.action === 'apply') {
    await tx.putRecord(ctx.campaignId, {
      recordKind: change.recordKind, recordId: change.recordId, version: versionOf(change),
      record: change.op === 'delete' ? null : change.record, serverSeq: seq,
    });
  }
  if (decision.loser !== null && current) {
    const loser = decision.loser === 'incoming' ? change : await tx.findChange(current.version.changeId);
    // The current version always came from a stored change; a missing one is a broken database.
    if (!loser) throw new Error(`push: stored change ${current.version.changeId} of record ${change.recordId} is missing`);
    const winner = decision.loser === 'incoming' ? current.version : versionOf(change);
    const conflict: ConflictRecord = {
      conflictId: loser.changeId,
      campaignId: ctx.campaignId,
      recordKind: change.recordKind,
      recordId: change.recordId,
      reason: conflictReason(decision),
      loser: wireChange(loser),
      winner: { changeId: winner.changeId, hlc: winner.hlc, deviceId: winner.deviceId, deleted: winner.deleted },
      status: 'open',
      resolvedBy: null,
      serverSeq: seq,
      detectedAt: receivedAt,
      resolvedAt: null,
    };
    const before = await tx.findConflict(conflict.conflictId);
    if (!before) await tx.upsertConflict(conflict);
  }
  for (const id of change.resolves ?? []) {
    const c = await tx.findConflict(id);
    if (c && c.status === 'open') await tx.upsertConflict({ ...c, status: 'resolved', resolvedBy: change.changeId, resolvedAt: receivedAt, serverSeq: seq });
  }
  const stored: StoredChange = {
    ...change,
    serverSeq: seq,
    receivedAt,
    outcome: OUTCOME[decision.action],
    contentHash,
  };
  if (parseHlc(change.hlc).wallMs > nowMs + FAR_FUTURE_MS) stored.clockSkewFlag = true;
  await tx.insertChange(stored);
  return stored;
}

/** The change exactly as pushed (no server bookkeeping), as a conflict keeps it. */
function wireChange(c: Change | StoredChange): Change {
  const out: Change = {
    changeId: c.changeId, campaignId: c.campaignId, recordKind: c.recordKind, recordId: c.recordId, op: c.op,
    record: c.record, hlc: c.hlc, deviceId: c.deviceId, baseHlc: c.baseHlc, protocolVersion: c.protocolVersion,
  };
  if (c.resolves) out.resolves = c.resolves;
  return out;
}
