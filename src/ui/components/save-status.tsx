// "Saved" appears only after the transaction resolved and the record read back (the store's
// commit does both); a failure shows its words and the draft stays in the form.
import { useCallback, useState } from 'react';
import { InputError, ValidationError } from '../../errors.ts';

export type SaveState =
  | { phase: 'idle' }
  | { phase: 'saving' }
  | { phase: 'saved'; at: number; what: string }
  | { phase: 'failed'; message: string; problems: string[] };

export function describeSaveError(err: unknown): { message: string; problems: string[] } {
  if (err instanceof ValidationError) {
    return { message: 'Not saved — please check:', problems: err.problems.map((p) => `${p.field}: ${p.reason}`) };
  }
  if (err instanceof InputError) return { message: `Not saved — ${err.field}: ${err.reason}`, problems: [] };
  return { message: err instanceof Error ? err.message : String(err), problems: [] };
}

export function useSaveState() {
  const [state, setState] = useState<SaveState>({ phase: 'idle' });
  const run = useCallback(async <T,>(what: string, save: () => Promise<T>): Promise<T | undefined> => {
    setState({ phase: 'saving' });
    try {
      const out = await save();
      setState({ phase: 'saved', at: Date.now(), what });
      return out;
    } catch (err) {
      setState({ phase: 'failed', ...describeSaveError(err) });
      return undefined;
    }
  }, []);
  const clear = useCallback(() => setState({ phase: 'idle' }), []);
  return { state, run, clear };
}

export function SaveStatus({ state }: { state: SaveState }) {
  if (state.phase === 'saving') return <p className="af-hint" data-testid="save-status" data-phase="saving">Saving…</p>;
  if (state.phase === 'saved') return <p className="af-saved" data-testid="save-status" data-phase="saved" role="status">Saved: {state.what}</p>;
  if (state.phase === 'failed') {
    return (
      <div className="af-error" data-testid="save-status" data-phase="failed" role="alert">
        {state.message}
        {state.problems.length > 0 && <ul>{state.problems.map((p) => <li key={p}>{p}</li>)}</ul>}
      </div>
    );
  }
  return null;
}
