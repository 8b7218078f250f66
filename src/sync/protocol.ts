// Wire protocol shared by the sync client and server (versioned; see DEVELOPERS.md "Sync").
// The change-log rows in the device store have exactly this shape, so a push sends them as they are.
import type { RecordKind } from '../campaign/records.ts';

export const PROTOCOL_VERSION = 1;

export type ChangeOp = 'put' | 'delete';

export interface Change {
  /** Device-made UUIDv7; the server deduplicates pushes by it. */
  changeId: string;
  campaignId: string;
  recordKind: RecordKind;
  /** Device-made id of the record this change is about. */
  recordId: string;
  op: ChangeOp;
  /** The whole record after the change for `put` (validated with the campaign schema); null for `delete` (a tombstone). */
  record: unknown;
  /** Hybrid-logical-clock stamp (src/sync/hlc.ts) of the device that made the change. */
  hlc: string;
  deviceId: string;
  /** HLC of the version this edit was made on top of (null for a create): how concurrent edits are detected. */
  baseHlc: string | null;
  protocolVersion: number;
  /**
   * Conflict ids (src/sync/conflict.ts) this change resolves; only a lead may send it. Absent on
   * ordinary edits. A resolution is an ordinary put/delete of the record made on top of its
   * current version, so the merge rules treat it like any other edit.
   */
  resolves?: string[];
}

/** Oldest protocol version this code still speaks (the server refuses older pushes with 426). */
export const MIN_PROTOCOL_VERSION = 1;

/** Largest push batch the server accepts; the client sends at most this many per request. */
export const MAX_PUSH_CHANGES = 200;
/** Largest pull page; the server clamps `limit` to it. */
export const MAX_PULL_LIMIT = 1000;
export const DEFAULT_PULL_LIMIT = 250;

/**
 * A stamp further than this ahead of the server clock is accepted but flagged (`clock-ahead`).
 * Phone clocks set by the network are within seconds; 5 minutes leaves room for a hand-set clock
 * before a person is asked to look (field-traps ).
 */
export const FAR_FUTURE_MS = 5 * 60 * 1000;

export const CREW_ROLES = ['observer', 'lead', 'viewer'] as const;
/** observer: push own readings and pull; lead: also exclusions, conflict resolutions, tokens; viewer: pull only. */
export type CrewRole = (typeof CREW_ROLES)[number];
