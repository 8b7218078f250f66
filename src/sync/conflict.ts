// A conflict: the losing side of a concurrent edit, kept for a person to resolve (never dropped).
// The server is the authority: it creates a conflict when its merge (merge.ts) names a loser, and
// publishes every conflict row on pull, so every device lists the same conflicts. A resolution is
// itself a change — a `put` or `delete` of the record made on top of the current version with
// `resolves: [conflictId]` — pushed by a lead; the server then marks the conflict resolved.
import type { RecordKind } from '../campaign/records.ts';
import type { Change } from './protocol.ts';

export const CONFLICT_REASONS = ['concurrent-edit', 'edit-after-delete', 'edited-while-deleted'] as const;
/**
 * concurrent-edit: two puts on the same base, the lower (hlc, device) lost;
 * edit-after-delete: a put that reached an existing tombstone;
 * edited-while-deleted: a live version displaced by a delete made without seeing it.
 */
export type ConflictReason = (typeof CONFLICT_REASONS)[number];

export const CONFLICT_STATUSES = ['open', 'resolved'] as const;
export type ConflictStatus = (typeof CONFLICT_STATUSES)[number];

export interface ConflictRecord {
  /** Equal to the losing change's id: a version loses at most once, and replays cannot double it. */
  conflictId: string;
  campaignId: string;
  recordKind: RecordKind;
  recordId: string;
  reason: ConflictReason;
  /** The losing version exactly as it was pushed (its `record` is the content shown to a person). */
  loser: Change;
  /** The version that won at detection time (the record's current content may be newer). */
  winner: { changeId: string; hlc: string; deviceId: string; deleted: boolean };
  status: ConflictStatus;
  /** The change that resolved it (null while open). */
  resolvedBy: string | null;
  /** Server sequence of the last change to this conflict row (it travels in the pull feed). */
  serverSeq: number;
  /** Server time of detection and of resolution, ISO 8601 UTC. */
  detectedAt: string;
  resolvedAt: string | null;
}
