// Conversions between database rows and the storage types, shared by both adapters. JSON columns
// are written as JSON text (SQLite TEXT, PostgreSQL JSONB via an explicit ::jsonb cast) and read
// back parsed; sequences may come back as strings (PostgreSQL BIGINT) and are converted with a
// range check rather than trusted.
import type { RecordKind } from '../campaign/records.ts';
import type { ConflictRecord, ConflictReason, ConflictStatus } from '../sync/conflict.ts';
import type { Change, CrewRole } from '../sync/protocol.ts';
import type { MergeOutcome } from '../sync/wire.ts';
import type { StoredChange, StoredRecord, TokenRow } from './storage.ts';

export type Row = Record<string, unknown>;

export function toSeq(v: unknown): number {
  const n = typeof v === 'string' ? Number(v) : v;
  if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 0) throw new RangeError(`database: sequence ${JSON.stringify(v)} is not a safe non-negative integer`);
  return n;
}

/** JSON column value as parsed data (text from SQLite, already parsed from PostgreSQL JSONB). */
export function fromJson(v: unknown): unknown {
  if (v === null || v === undefined) return null;
  return typeof v === 'string' ? JSON.parse(v) as unknown : v;
}

export function toJson(v: unknown): string | null {
  return v === null || v === undefined ? null : JSON.stringify(v);
}

/** Text columns come back as strings; anything else means the schema is not what we wrote. */
const str = (v: unknown): string => {
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'bigint') return String(v);
  throw new TypeError(`database: expected a text column, got ${typeof v}`);
};
const strOrNull = (v: unknown): string | null => (v === null || v === undefined ? null : str(v));
const bool = (v: unknown): boolean => v === true || v === 1 || v === '1';

export function changeFromRow(r: Row): StoredChange {
  const resolves = fromJson(r.resolves) as string[] | null;
  const c: StoredChange = {
    changeId: str(r.change_id),
    campaignId: str(r.campaign_id),
    recordKind: str(r.record_kind) as RecordKind,
    recordId: str(r.record_id),
    op: str(r.op) as Change['op'],
    record: fromJson(r.record),
    hlc: str(r.hlc),
    deviceId: str(r.device_id),
    baseHlc: strOrNull(r.base_hlc),
    protocolVersion: Number(r.protocol_version),
    serverSeq: toSeq(r.server_seq),
    receivedAt: str(r.received_at),
    outcome: str(r.outcome) as MergeOutcome,
    contentHash: str(r.content_hash),
  };
  if (resolves) c.resolves = resolves;
  if (bool(r.clock_ahead)) c.clockSkewFlag = true;
  return c;
}

/** The pulled (wire) shape of a stored change: server bookkeeping removed. */
export function pulledOf(c: StoredChange): Omit<StoredChange, 'outcome' | 'contentHash'> {
  const { outcome: _o, contentHash: _h, ...pulled } = c;
  return pulled;
}

export function recordFromRow(r: Row): StoredRecord {
  return {
    recordKind: str(r.record_kind) as RecordKind,
    recordId: str(r.record_id),
    version: {
      changeId: str(r.change_id),
      hlc: str(r.hlc),
      deviceId: str(r.device_id),
      deleted: bool(r.deleted),
      baseHlc: strOrNull(r.base_hlc),
    },
    record: fromJson(r.record),
    serverSeq: toSeq(r.server_seq),
  };
}

export function conflictFromRow(r: Row): ConflictRecord {
  return {
    conflictId: str(r.conflict_id),
    campaignId: str(r.campaign_id),
    recordKind: str(r.record_kind) as RecordKind,
    recordId: str(r.record_id),
    reason: str(r.reason) as ConflictReason,
    loser: fromJson(r.loser) as Change,
    winner: fromJson(r.winner) as ConflictRecord['winner'],
    status: str(r.status) as ConflictStatus,
    resolvedBy: strOrNull(r.resolved_by),
    serverSeq: toSeq(r.server_seq),
    detectedAt: str(r.detected_at),
    resolvedAt: strOrNull(r.resolved_at),
  };
}

export function tokenFromRow(r: Row): TokenRow {
  return {
    id: str(r.id),
    campaignId: str(r.campaign_id),
    tokenHash: str(r.token_hash),
    role: str(r.role) as CrewRole,
    label: str(r.label),
    deviceId: strOrNull(r.device_id),
    createdAt: str(r.created_at),
    revokedAt: strOrNull(r.revoked_at),
  };
}

/** Column values of a change row, in the order of CHANGE_COLUMNS. */
export const CHANGE_COLUMNS = ['change_id', 'campaign_id', 'server_seq', 'record_kind', 'record_id', 'op', 'record', 'hlc',
  'device_id', 'base_hlc', 'protocol_version', 'resolves', 'received_at', 'clock_ahead', 'outcome', 'content_hash'] as const;

export function changeValues(c: StoredChange, clockAhead: boolean | number): unknown[] {
  return [c.changeId, c.campaignId, c.serverSeq, c.recordKind, c.recordId, c.op, toJson(c.record), c.hlc, c.deviceId,
    c.baseHlc, c.protocolVersion, c.resolves ? JSON.stringify(c.resolves) : null, c.receivedAt, clockAhead, c.outcome, c.contentHash];
}

export const CONFLICT_COLUMNS = ['conflict_id', 'campaign_id', 'record_kind', 'record_id', 'reason', 'loser', 'winner', 'status',
  'resolved_by', 'server_seq', 'detected_at', 'resolved_at'] as const;

export function conflictValues(c: ConflictRecord): unknown[] {
  return [c.conflictId, c.campaignId, c.recordKind, c.recordId, c.reason, JSON.stringify(c.loser), JSON.stringify(c.winner),
    c.status, c.resolvedBy, c.serverSeq, c.detectedAt, c.resolvedAt];
}
