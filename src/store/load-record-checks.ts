// The record schemas (zod, about 24 KB gzip) are loaded when the store first writes, not at start-up:
// every write path is async already and validates before its transaction, so a write awaits this
// first and nothing is stored unchecked. The service worker precaches the chunk, so the first save
// also works offline. A chunk that cannot load (an update half-installed) refuses the write in words.
import { ArcfieldError } from '../errors.ts';
import type * as RecordChecks from './record-checks.ts';

export type RecordChecksModule = typeof RecordChecks;

const REASON = 'the record checks of the app could not be loaded, so nothing was saved. Reload the app; your entry is kept in the form.';

/** The record checks could not be loaded; nothing was written. `field`/`value`: what was being saved. */
export class RecordChecksUnavailableError extends ArcfieldError {
  override name = 'RecordChecksUnavailableError';
  readonly field: string;
  readonly value: unknown;
  readonly reason: string;
  constructor(field: string, value: unknown, cause: unknown) {
    super(`Not saved: ${REASON}`, { cause });
    this.field = field;
    this.value = value;
    this.reason = REASON;
  }
}

/**
 * The record checks module. The module loader caches it, so only the first call fetches.
 * `field`/`value`: what is being written (for the error, should the load fail).
 */
export async function loadRecordChecks(field: string, value: unknown): Promise<RecordChecksModule> {
  try {
    return await import('./record-checks.ts');
  } catch (err) {
    throw new RecordChecksUnavailableError(field, value, err);
  }
}
