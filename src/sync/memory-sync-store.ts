// An in-memory SyncStore: the reference implementation of the port (sync-store.ts) with the same
// merge rules the Dexie store uses, for the sync tests, the load bench and office tools. Local
// edits are applied and logged in one synchronous step (nothing can interleave), which is the
// in-memory equivalent of the record and its change-log row sharing one transaction.
import type { RecordKind } from '../campaign/records.ts';
import { InputError } from '../errors.ts';
import type { ConflictRecord } from './conflict.ts';
import type { HybridLogicalClock } from './hlc.ts';
import { mergeChange, versionOf, type RecordVersion } from './merge.ts';
import { PROTOCOL_VERSION, type Change, type ChangeOp } from './protocol.ts';
import type { PulledChange, SyncStore } from './sync-store.ts';

export interface MemoryRecord {
  recordKind: RecordKind;
  recordId: string;
  version: RecordVersion;
  /** null for a tombstone. */
  record: unknown;
}

interface CampaignState {
  records: Map<string, MemoryRecord>;
  outbox: Change[];
  rejected: Map<string, { change: Change; reason: string }>;
  conflicts: Map<string, ConflictRecord>;
  cursor: number;
  lastSyncAt: string | null;
}

const keyOf = (kind: RecordKind, id: string) => `${kind}/${id}`;

export class MemorySyncStore implements SyncStore {
  private readonly campaigns = new Map<string, CampaignState>();

  constructor(readonly deviceId: string, private readonly clock: HybridLogicalClock, private readonly newId: () => string) {}

  private state(campaignId: string): CampaignState {
    let s = this.campaigns.get(campaignId);
    if (!s) {
      s = { records: new Map(), outbox: [], rejected: new Map(), conflicts: new Map(), cursor: 0, lastSyncAt: null };
      this.campaigns.set(campaignId, s);
    }
    return s;
  }

  /** A local edit: stamp it, apply it, log it. A deleted record cannot be edited (it never comes back). */
  edit(campaignId: string, recordKind: RecordKind, recordId: string, op: ChangeOp, record: unknown, resolves?: string[]): Change {
    const s = this.state(campaignId);
    const current = s.records.get(keyOf(recordKind, recordId));
    if (current?.version.deleted) throw new InputError('recordId', recordId, 'this record was deleted; a deletion is final');
    if (!current && op === 'delete') throw new InputError('recordId', recordId, 'no such record to delete');
    const change: Change = {
      changeId: this.newId(), campaignId, recordKind, recordId, op,
      record: op === 'delete' ? null : record,
      hlc: this.clock.tick(), deviceId: this.deviceId, baseHlc: current?.version.hlc ?? null, protocolVersion: PROTOCOL_VERSION,
    };
    if (resolves && resolves.length > 0) change.resolves = resolves;
    s.records.set(keyOf(recordKind, recordId), { recordKind, recordId, version: versionOf(change), record: change.record });
    s.outbox.push(change);
    return change;
  }

  /** Current records of the campaign (tombstones included), keyed "kind/id". */
  records(campaignId: string): ReadonlyMap<string, MemoryRecord> {
    return this.state(campaignId).records;
  }

  rejectedChanges(campaignId: string): { change: Change; reason: string }[] {
    return [...this.state(campaignId).rejected.values()];
  }

  async pendingChanges(campaignId: string, limit: number): Promise<Change[]> {
    return this.state(campaignId).outbox.slice(0, limit).map((c) => structuredClone(c));
  }

  async pendingCount(campaignId: string): Promise<number> {
    return this.state(campaignId).outbox.length;
  }

  async markAcknowledged(changeIds: readonly string[]): Promise<void> {
    const done = new Set(changeIds);
    for (const s of this.campaigns.values()) s.outbox = s.outbox.filter((c) => !done.has(c.changeId));
  }

  async markRejected(rejections: readonly { changeId: string; reason: string }[]): Promise<void> {
    const reasons = new Map(rejections.map((r) => [r.changeId, r.reason]));
    for (const s of this.campaigns.values()) {
      s.outbox = s.outbox.filter((c) => {
        const reason = reasons.get(c.changeId);
        if (reason === undefined) return true;
        s.rejected.set(c.changeId, { change: c, reason });
        return false;
      });
    }
  }

  async cursor(campaignId: string): Promise<number> {
    return this.state(campaignId).cursor;
  }

  async applyPulled(campaignId: string, changes: readonly PulledChange[], nextCursor: number, conflicts: readonly ConflictRecord[] = []): Promise<void> {
    const s = this.state(campaignId);
    // Work on copies and swap at the end: all or nothing, like one IndexedDB transaction.
    const records = new Map(s.records);
    for (const c of changes) {
      if (c.campaignId !== campaignId) throw new InputError('change.campaignId', c.campaignId, `pulled into campaign ${campaignId}`);
      const key = keyOf(c.recordKind, c.recordId);
      const decision = mergeChange(records.get(key)?.version ?? null, c);
      if (decision.action === 'apply') {
        records.set(key, { recordKind: c.recordKind, recordId: c.recordId, version: versionOf(c), record: c.op === 'delete' ? null : structuredClone(c.record) });
      }
    }
    const conflictMap = new Map(s.conflicts);
    for (const cf of conflicts) {
      const before = conflictMap.get(cf.conflictId);
      if (!before || before.serverSeq <= cf.serverSeq) conflictMap.set(cf.conflictId, structuredClone(cf));
    }
    s.records = records;
    s.conflicts = conflictMap;
    s.cursor = Math.max(s.cursor, nextCursor);
  }

  async conflicts(campaignId: string): Promise<ConflictRecord[]> {
    return [...this.state(campaignId).conflicts.values()];
  }

  async rejectedCount(campaignId: string): Promise<number> {
    return this.state(campaignId).rejected.size;
  }

  async lastSyncAt(campaignId: string): Promise<string | null> {
    return this.state(campaignId).lastSyncAt;
  }

  async setLastSyncAt(campaignId: string, at: string): Promise<void> {
    this.state(campaignId).lastSyncAt = at;
  }
}
