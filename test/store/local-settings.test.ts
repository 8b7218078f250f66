// updateSetting: read-modify-write in one transaction. Two edits started together both survive
// (each merges into what the other wrote), and a `next` that throws writes nothing.
import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../src/errors.ts';
import { openFieldStore } from '../../src/store/field-store.ts';
import { readSetting, updateSetting, writeSetting } from '../../src/store/local-settings.ts';

type Prefs = Record<string, number>;
const merge = (patch: Prefs) => (stored: unknown): Prefs => ({ ...(stored as Prefs | undefined), ...patch });

describe('updateSetting', () => {
  it('keeps both of two concurrent edits', async () => {
    const { db } = await openFieldStore({ name: `ls-${Math.random()}` });
    await writeSetting(db, 'prefs', { a: 1, b: 1 });
    await Promise.all([updateSetting(db, 'prefs', merge({ a: 2 })), updateSetting(db, 'prefs', merge({ b: 3 }))]);
    expect(await readSetting(db, 'prefs')).toEqual({ a: 2, b: 3 });
    db.close();
  });

  it('writes nothing when next throws', async () => {
    const { db } = await openFieldStore({ name: `ls-${Math.random()}` });
    await writeSetting(db, 'prefs', { a: 1 });
    const refuse = (): Prefs => { throw new ValidationError([{ field: 'a', value: -1, reason: 'at least 0' }], 'prefs'); };
    await expect(updateSetting(db, 'prefs', refuse)).rejects.toBeInstanceOf(ValidationError);
    expect(await readSetting(db, 'prefs')).toEqual({ a: 1 });
    db.close();
  });
});
