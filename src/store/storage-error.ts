// Storage failures in words a crew member can act on. IndexedDB reports the real cause in layers
// (Dexie wraps a DOMException in `.inner`, an aborted transaction wraps the request's error), so
// the classifier walks `.inner` and `.cause` to the first name it knows (field-traps ).
import { ArcfieldError } from '../errors.ts';

export type StorageErrorKind =
  | 'quota'        // the browser refused more data
  | 'closed'       // the database was closed (another tab upgraded it, or the browser evicted it)
  | 'blocked'      // an upgrade waits for other tabs
  | 'version'      // the stored database is newer than this app
  | 'constraint'   // a unique key already exists
  | 'data'         // a value IndexedDB cannot store
  | 'timeout'      // the save did not commit in time (watchdog)
  | 'unknown';

const KIND_OF_NAME: Record<string, StorageErrorKind> = {
  QuotaExceededError: 'quota',
  DatabaseClosedError: 'closed',
  InvalidStateError: 'closed',
  VersionChangeError: 'closed',
  BlockedError: 'blocked',
  VersionError: 'version',
  UpgradeError: 'version',
  ConstraintError: 'constraint',
  DataError: 'data',
  DataCloneError: 'data',
  TimeoutError: 'timeout',
};

const REASON_OF_KIND: Record<StorageErrorKind, string> = {
  quota: 'the phone has no room left for app data. Sync or export this campaign, then free space on the device; your entry is kept in the form.',
  closed: 'the database was closed (the app may have been updated in another tab). Reload the app; your entry is kept in the form.',
  blocked: 'another tab of arcfield is holding the database. Close the other tabs and try again.',
  version: 'the data on this device was written by a newer version of arcfield. Reload to get the new version.',
  constraint: 'a record with the same key is already stored. Nothing was changed.',
  data: 'a value could not be stored. Nothing was changed; check the entry.',
  timeout: 'the save did not finish in time. It is not saved yet; your entry is kept in the form.',
  unknown: 'the device storage reported an error. Nothing was changed; your entry is kept in the form.',
};

/** A save or read that failed in the storage layer. `field` is the table, `value` the record id. */
export class StorageError extends ArcfieldError {
  override name = 'StorageError';
  readonly kind: StorageErrorKind;
  readonly field: string;
  readonly value: unknown;
  readonly reason: string;
  /** The innermost error name found, e.g. "QuotaExceededError". */
  readonly causeName: string;
  constructor(kind: StorageErrorKind, field: string, value: unknown, causeName: string, cause?: unknown) {
    const reason = REASON_OF_KIND[kind];
    super(`Not saved: ${reason}`, { cause });
    this.kind = kind;
    this.field = field;
    this.value = value;
    this.reason = reason;
    this.causeName = causeName;
  }
}

const MAX_DEPTH = 8;

/** The chain of error names from the outside in: Dexie error, its `.inner`, their `.cause`. */
export function errorNameChain(err: unknown): string[] {
  const names: string[] = [];
  let cur: unknown = err;
  for (let depth = 0; depth < MAX_DEPTH && cur !== null && typeof cur === 'object'; depth++) {
    const name = (cur as { name?: unknown }).name;
    if (typeof name === 'string') names.push(name);
    const next = (cur as { inner?: unknown }).inner ?? (cur as { cause?: unknown }).cause;
    if (next === cur) break;
    cur = next;
  }
  return names;
}

/** Wrap any storage failure as a StorageError; StorageError passes through unchanged. */
export function classifyStorageError(err: unknown, field: string, value: unknown): StorageError {
  if (err instanceof StorageError) return err;
  const names = errorNameChain(err);
  // The innermost known name is the real cause (an AbortError usually wraps it).
  for (let i = names.length - 1; i >= 0; i--) {
    const kind = KIND_OF_NAME[names[i]];
    if (kind) return new StorageError(kind, field, value, names[i], err);
  }
  return new StorageError('unknown', field, value, names[names.length - 1] ?? typeof err, err);
}
