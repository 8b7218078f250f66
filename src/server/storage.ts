// The storage port of the sync server. Two adapters implement it (sqlite-storage.ts,
// postgres-storage.ts); the push and pull rules live once, above it (push-batch.ts), so both
// databases merge identically. Every method that writes does so in one durable transaction.
import type { RecordKind } from '../campaign/records.ts';
import type { ConflictRecord } from '../sync/conflict.ts';
import type { RecordVersion } from '../sync/merge.ts';
import type { CrewRole } from '../sync/protocol.ts';
import type { PulledChange } from '../sync/sync-store.ts';
import type { MergeOutcome } from '../sync/wire.ts';

export interface CampaignRow {
  id: string;
  name: string;
  createdAt: string;
  lastSeq: number;
}

export interface TokenRow {
  id: string;
  campaignId: string;
  /** SHA-256 of the secret, hex (the secret itself is never stored). */
  tokenHash: string;
  role: CrewRole;
  label: string;
  deviceId: string | null;
  createdAt: string;
  revokedAt: string | null;
}

/** A change as the server keeps it: the pulled shape plus the original push outcome (for replays). */
export interface StoredChange extends PulledChange {
  outcome: MergeOutcome;
  /** SHA-256 of the change's canonical JSON: a replay with the same id but other content is refused. */
  contentHash: string;
}

export interface StoredRecord {
  recordKind: RecordKind;
  recordId: string;
  version: RecordVersion;
  /** Content of the current version; null for a tombstone. */
  record: unknown;
  serverSeq: number;
}

export interface PullPage {
  changes: PulledChange[];
  conflicts: ConflictRecord[];
  nextCursor: number;
  hasMore: boolean;
}

/** Operations available inside one push transaction (the campaign row is locked for its duration). */
export interface PushTx {
  /** Lock the campaign for this transaction and return it (null when it does not exist). */
  lockCampaign(campaignId: string): Promise<CampaignRow | null>;
  setLastSeq(campaignId: string, lastSeq: number): Promise<void>;
  findChange(changeId: string): Promise<StoredChange | null>;
  insertChange(change: StoredChange): Promise<void>;
  findRecord(campaignId: string, kind: RecordKind, recordId: string): Promise<StoredRecord | null>;
  putRecord(campaignId: string, rec: StoredRecord): Promise<void>;
  findConflict(conflictId: string): Promise<ConflictRecord | null>;
  upsertConflict(conflict: ConflictRecord): Promise<void>;
}

export interface SyncStorage {
  readonly kind: 'sqlite' | 'postgres';
  /** Apply pending schema migrations; returns the schema version now in force. */
  migrate(): Promise<number>;
  schemaVersion(): Promise<number>;
  /** Readiness: the database answers a trivial query. */
  ping(): Promise<void>;
  close(): Promise<void>;

  /** Run `fn` in one durable transaction; commits only when it resolves, rolls back when it throws. */
  pushTransaction<T>(fn: (tx: PushTx) => Promise<T>): Promise<T>;
  /** Changes with serverSeq > after (at most `limit`, in order) and conflicts touched in that range. */
  pull(campaignId: string, after: number, limit: number): Promise<PullPage>;

  createCampaign(campaign: { id: string; name: string; createdAt: string }, firstToken: TokenRow): Promise<void>;
  findCampaign(campaignId: string): Promise<CampaignRow | null>;
  insertToken(token: TokenRow): Promise<void>;
  findTokenByHash(tokenHash: string): Promise<TokenRow | null>;
  listTokens(campaignId: string): Promise<TokenRow[]>;
  /** Bind an unbound token to a device; false when the device is taken by another live token of the campaign. */
  bindTokenDevice(tokenId: string, deviceId: string): Promise<boolean>;
  revokeToken(campaignId: string, tokenId: string, at: string): Promise<boolean>;

  listConflicts(campaignId: string): Promise<ConflictRecord[]>;
  /** Current version of every record of the campaign (tests, exports). */
  listRecords(campaignId: string): Promise<StoredRecord[]>;
  /** Number of stored changes of the campaign (tests, the load check). */
  countChanges(campaignId: string): Promise<number>;
}
