// What the sync client needs from a device's local store. The Dexie store implements it
// (src/store); tests may swap in another implementation. The client is given this, its clock,
// its id source and `fetch`, so fault-injection tests can replace any of them (style.md §7).
// Local edits must be stamped with the SAME HybridLogicalClock instance the client is given (the
// client `receive`s every pulled stamp before `applyPulled`, so an edit made on top of a pulled
// version sorts after it — the precondition of merge.ts), with `baseHlc` = the edited version's
// stamp (null for a create). A conflict resolution is a local edit carrying `resolves`
// (resolutionFor in src/sync/resolution.ts); keep `resolves` on the change-log row.
import type { Change } from './protocol.ts';
import type { ConflictRecord } from './conflict.ts';

/** A change as the server returns it on pull: the pushed change plus the server's own sequence. */
export interface PulledChange extends Change {
  /** Server sequence (monotonic per server); the pull cursor is the last one committed locally. */
  serverSeq: number;
  /** Server receive time, ISO 8601 UTC. */
  receivedAt: string;
  /** Set when the device's stamp was far in the future of the server's clock (accepted, flagged). */
  clockSkewFlag?: boolean;
}

export interface SyncStore {
  /** Local changes not yet acknowledged by the server, oldest first, at most `limit`. */
  pendingChanges(campaignId: string, limit: number): Promise<Change[]>;
  pendingCount(campaignId: string): Promise<number>;
  /** The server acknowledged these (durably committed there): they leave the outbox. */
  markAcknowledged(changeIds: readonly string[]): Promise<void>;
  /** The server refused these (with reasons): kept locally and shown for a person to act on. */
  markRejected(rejections: readonly { changeId: string; reason: string }[]): Promise<void>;
  /** Last server sequence committed locally for the campaign (0 when never pulled). */
  cursor(campaignId: string): Promise<number>;
  /**
   * Apply pulled changes with the merge rules (src/sync/merge.ts) and advance the cursor to
   * `nextCursor` — all in ONE local transaction, so a crash never advances the cursor past changes
   * that were not stored.
   *
   * Per change: look up the record's current version (changeId, hlc, deviceId, deleted, baseHlc —
   * keep changeId and baseHlc on the row), call `mergeChange(current, change)`; on action 'apply'
   * store `change.record` (or the tombstone) with `versionOf(change)` as its bookkeeping; on every
   * other action leave the record alone. The pulled change includes this device's own changes
   * (echoes: they merge as 'ignore'). `loser` is only advisory on a device: the server's conflict
   * rows (`conflicts`, upsert by conflictId — a later copy replaces an earlier one) are the list a
   * person resolves. Never move the cursor backwards (ignore a `nextCursor` below the stored one).
   */
  applyPulled(campaignId: string, changes: readonly PulledChange[], nextCursor: number, conflicts?: readonly ConflictRecord[]): Promise<void>;
  /** Conflicts of the campaign as last pulled from the server (open and resolved). */
  conflicts(campaignId: string): Promise<ConflictRecord[]>;
  /** Changes the server refused (markRejected) and a person has not dealt with yet. */
  rejectedCount(campaignId: string): Promise<number>;
  /** Time of the last fully successful sync, ISO 8601, or null. */
  lastSyncAt(campaignId: string): Promise<string | null>;
  setLastSyncAt(campaignId: string, at: string): Promise<void>;
}
