// How a person's choice on a conflict becomes a change (resolution is itself a change, pushed by a
// lead and merged like any other edit). The store stamps it (hlc, baseHlc = the current version's
// stamp, changeId) and writes it with its change-log row in one transaction.
import { InputError } from '../errors.ts';
import type { ConflictRecord } from './conflict.ts';
import type { ChangeOp } from './protocol.ts';

export type ResolutionChoice =
  /** Keep what the record holds now; the conflict is closed by re-writing the current content. */
  | { keep: 'current'; currentRecord: unknown; currentDeleted: boolean }
  /** Bring the losing version back as the record's content. */
  | { keep: 'loser' }
  /** A person merged the two by hand: this is the new content (validated by the store's schema). */
  | { keep: 'merged'; record: unknown };

export interface ResolutionEdit {
  op: ChangeOp;
  /** Content for a put; null for a delete. */
  record: unknown;
  resolves: string[];
  /**
   * True when the content must be written as a NEW record (fresh id from the store's id source,
   * also set as the record's `id`): a tombstone never comes back, so restoring an edit that met a
   * deletion re-creates it under a new id.
   */
  asNewRecord: boolean;
}

export function resolutionFor(conflict: ConflictRecord, choice: ResolutionChoice): ResolutionEdit {
  const resolves = [conflict.conflictId];
  switch (choice.keep) {
    case 'current':
      return choice.currentDeleted
        ? { op: 'delete', record: null, resolves, asNewRecord: false }
        : { op: 'put', record: choice.currentRecord, resolves, asNewRecord: false };
    case 'loser':
      if (conflict.loser.op === 'delete' || conflict.loser.record === null) {
        return { op: 'delete', record: null, resolves, asNewRecord: false };
      }
      return { op: 'put', record: conflict.loser.record, resolves, asNewRecord: conflict.reason === 'edit-after-delete' };
    case 'merged':
      if (choice.record === null || typeof choice.record !== 'object') {
        throw new InputError('resolution.record', choice.record, 'a merged resolution needs the whole record');
      }
      return { op: 'put', record: choice.record, resolves, asNewRecord: conflict.reason === 'edit-after-delete' };
  }
}
