// Form state that survives the app being killed: written to the store's local settings on every
// change (field-traps ), restored when the form opens, cleared only after a save read back.
import { useCallback, useEffect, useRef, useState } from 'react';
import { clearDraft, loadDraft, saveDraft } from '../../store/local-settings.ts'; // by path, as in live-fit-hub.ts
import { useServices } from './services.tsx';

export interface Draft<T> {
  value: T;
  /** True once the stored draft (if any) has been read. */
  ready: boolean;
  /** The draft came back from storage (the form was left unsaved earlier). */
  restored: boolean;
  /** Why the last draft write failed (shown under the form), or null. */
  writeError: string | null;
  update: (patch: Partial<T>) => void;
  /** Forget the draft (after the record's save has read back), optionally starting from `next`. */
  reset: (next?: T) => Promise<void>;
}

export function useDraft<T extends object>(form: string, initial: T): Draft<T> {
  const { store } = useServices();
  const [value, setValue] = useState<T>(initial);
  const [ready, setReady] = useState(false);
  const [restored, setRestored] = useState(false);
  const [writeError, setWriteError] = useState<string | null>(null);
  const initialRef = useRef(initial);
  const latest = useRef(value);

  useEffect(() => {
    let live = true;
    loadDraft<T>(store.db, form).then((stored) => {
      if (!live) return;
      if (stored) { setValue({ ...initialRef.current, ...stored }); latest.current = { ...initialRef.current, ...stored }; setRestored(true); }
      else { setValue(initialRef.current); latest.current = initialRef.current; setRestored(false); }
      setReady(true);
    }, (err: unknown) => { if (live) { setWriteError(`Draft could not be read: ${String(err)}`); setReady(true); } });
    return () => { live = false; };
  }, [store, form]);

  const update = useCallback((patch: Partial<T>) => {
    const next = { ...latest.current, ...patch };
    latest.current = next;
    setValue(next);
    saveDraft(store.db, form, next).then(() => setWriteError(null), (err: unknown) => setWriteError(`Draft not kept: ${err instanceof Error ? err.message : String(err)}`));
  }, [store, form]);

  const reset = useCallback(async (next?: T) => {
    await clearDraft(store.db, form);
    const v = next ?? initialRef.current;
    latest.current = v;
    setValue(v);
    setRestored(false);
  }, [store, form]);

  return { value, ready, restored, writeError, update, reset };
}
