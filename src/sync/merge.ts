// Merge rules for one record, shared by the device store and the sync server (DEVELOPERS.md "Sync").
//
// Versions of a record are totally ordered by (HLC stamp, device id): stamps compare as strings
// (hlc.ts makes string order equal stamp order), device ids by UTF-16 code units (never locale
// order, which differs between runtimes). The rules are chosen so that the final state of a record
// does not depend on the order in which its changes arrive:
//   - live record = the greatest `put` by (hlc, device) — a max is commutative and idempotent;
//   - once any `delete` has been seen the record is a tombstone for ever (the greatest delete is
//     kept as its version) — "tombstone wins", so a device offline for weeks cannot resurrect it.
// Whether the loser of a comparison becomes a conflict depends on causality, not on order: a
// change whose `baseHlc` is the current version's stamp was made on top of it (it supersedes it);
// anything else that meets a live version is a concurrent edit, and its losing side is kept as a
// conflict record for a person — never dropped. The server is the authority for conflicts (it sees
// every change once, in its own sequence order) and publishes them on pull; a device uses the same
// decision for its record state and may show `loser` as provisional until the server's copy arrives.
//
// Precondition (kept by the sync client): every device stamps its edits with a clock that has
// `receive`d every stamp it pulled, so an edit made on top of version v always sorts after v.
// A successor that nevertheless sorts before its base (a clock that skipped `receive`) is treated
// as a losing concurrent edit: keeping the max rule is what keeps replicas identical.
import type { Change } from './protocol.ts';

/** What a replica knows about the current version of one record (a row's sync bookkeeping). */
export interface RecordVersion {
  /** Change that produced this version (the server's conflict ids are loser change ids). */
  changeId: string;
  hlc: string;
  deviceId: string;
  /** True when this version is a tombstone. */
  deleted: boolean;
  /** Stamp of the version it was edited from (null for a create). */
  baseHlc: string | null;
}

export type MergeAction =
  /** Incoming becomes the current version (for a `delete`: the record becomes / stays a tombstone). */
  | 'apply'
  /** Nothing changes and nothing is kept: a duplicate, or an older version already superseded. */
  | 'ignore'
  /** Incoming loses a concurrent edit: not applied, kept as a conflict record. */
  | 'conflict'
  /** Incoming `put` meets a tombstone: not applied; kept as a conflict unless the delete saw it. */
  | 'tombstone-wins';

export type MergeReason =
  | 'new-record'
  | 'successor'
  | 'newer-concurrent'
  | 'delete'
  | 'later-delete'
  | 'duplicate'
  | 'superseded'
  | 'older-delete'
  | 'older-concurrent'
  | 'deleted-concurrently'
  | 'deleted-after';

export interface MergeDecision {
  action: MergeAction;
  reason: MergeReason;
  /**
   * Which version is kept as a conflict record for a person: the incoming change, the current
   * version (displaced by a newer concurrent edit or a concurrent delete), or none.
   */
  loser: 'incoming' | 'current' | null;
}

/** The part of a change the rules look at (a full `Change` fits). */
export type IncomingVersion = Pick<Change, 'changeId' | 'hlc' | 'deviceId' | 'op' | 'baseHlc'>;

/** Total order of versions: negative when a sorts before b, 0 for the same (hlc, device). */
export function compareVersions(a: Pick<RecordVersion, 'hlc' | 'deviceId'>, b: Pick<RecordVersion, 'hlc' | 'deviceId'>): number {
  if (a.hlc !== b.hlc) return a.hlc < b.hlc ? -1 : 1;
  if (a.deviceId !== b.deviceId) return a.deviceId < b.deviceId ? -1 : 1;
  return 0;
}

/**
 * Decide what an incoming change does to a record whose current version on this replica is
 * `current` (null when the replica has never seen the record). Pure; the caller stores the result.
 */
export function mergeChange(current: RecordVersion | null, incoming: IncomingVersion): MergeDecision {
  if (current === null) {
    return { action: 'apply', reason: incoming.op === 'delete' ? 'delete' : 'new-record', loser: null };
  }
  const order = compareVersions(incoming, current);
  if (incoming.changeId === current.changeId || order === 0) return { action: 'ignore', reason: 'duplicate', loser: null };

  const onTopOfCurrent = incoming.baseHlc === current.hlc;
  const currentIsOnTopOfIncoming = current.baseHlc === incoming.hlc;

  if (current.deleted) {
    if (incoming.op === 'delete') {
      return order > 0 ? { action: 'apply', reason: 'later-delete', loser: null } : { action: 'ignore', reason: 'older-delete', loser: null };
    }
    // A put the delete was made on top of is simply history; any other put was written without
    // knowing about the delete (concurrently, or later on a device that had not pulled it yet).
    if (currentIsOnTopOfIncoming) return { action: 'ignore', reason: 'superseded', loser: null };
    return { action: 'tombstone-wins', reason: order > 0 ? 'deleted-after' : 'deleted-concurrently', loser: 'incoming' };
  }

  if (incoming.op === 'delete') {
    // Tombstone wins whatever the stamps say; an edit the deleter never saw is kept for a person.
    return { action: 'apply', reason: 'delete', loser: onTopOfCurrent ? null : 'current' };
  }

  if (order > 0) {
    return onTopOfCurrent
      ? { action: 'apply', reason: 'successor', loser: null }
      : { action: 'apply', reason: 'newer-concurrent', loser: 'current' };
  }
  if (currentIsOnTopOfIncoming) return { action: 'ignore', reason: 'superseded', loser: null };
  return { action: 'conflict', reason: 'older-concurrent', loser: 'incoming' };
}

/** The version a replica holds after applying `incoming` with action 'apply'. */
export function versionOf(incoming: IncomingVersion): RecordVersion {
  return {
    changeId: incoming.changeId,
    hlc: incoming.hlc,
    deviceId: incoming.deviceId,
    deleted: incoming.op === 'delete',
    baseHlc: incoming.baseHlc,
  };
}
