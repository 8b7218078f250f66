// Device-local key/value settings (never synced): app preferences, form drafts, sync cursors.
// Drafts are written on every field change so killing the app loses at most the field being
// typed (field-traps ); they are cleared only after the record's save has read back.
import type { ArcfieldDb } from './arcfield-db.ts';

export const DRAFT_PREFIX = 'draft:';

export async function readSetting<T>(db: ArcfieldDb, key: string): Promise<T | undefined> {
  const row = await db.settings.get(key);
  return row?.value as T | undefined;
}

export async function writeSetting(db: ArcfieldDb, key: string, value: unknown): Promise<void> {
  await db.settings.put({ key, value });
}

/**
 * Read-modify-write of one setting in one transaction, so two quick edits (each merging its patch
 * into the stored value) cannot lose one another. `next` runs inside the transaction and must not
 * await anything but Dexie; if it throws, nothing is written. Returns what was written.
 */
export async function updateSetting<T>(db: ArcfieldDb, key: string, next: (stored: unknown) => T): Promise<T> {
  return db.transaction('rw', db.settings, async () => {
    const value = next((await db.settings.get(key))?.value);
    await db.settings.put({ key, value });
    return value;
  });
}

export async function saveDraft(db: ArcfieldDb, form: string, value: unknown): Promise<void> {
  await db.settings.put({ key: DRAFT_PREFIX + form, value: { value, savedAt: new Date().toISOString() } });
}

export async function loadDraft<T>(db: ArcfieldDb, form: string): Promise<T | undefined> {
  const row = await db.settings.get(DRAFT_PREFIX + form);
  return (row?.value as { value: T } | undefined)?.value;
}

export async function clearDraft(db: ArcfieldDb, form: string): Promise<void> {
  await db.settings.delete(DRAFT_PREFIX + form);
}
