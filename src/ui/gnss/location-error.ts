// Location failures, each with its own message and its own fix (field-traps ): the
// web API reports codes 1 (permission denied), 2 (position unavailable: location switched off or
// no signal) and 3 (time-out); the native plugin reports messages, matched here by their words.
export type LocationErrorKind = 'denied' | 'off' | 'timeout' | 'unavailable';

export interface LocationProblem {
  kind: LocationErrorKind;
  /** What happened and what to do, for the capture screen. */
  message: string;
  /** The platform's own text, kept for support. */
  detail: string;
}

const MESSAGES: Record<LocationErrorKind, string> = {
  denied: 'Location permission is refused for arcfield. Allow location (precise) for this app in the phone or browser settings, then try again.',
  off: 'Location is switched off on this phone, or there is no satellite signal. Turn location on (and move into open sky), then try again.',
  timeout: 'No new fix yet — this is normal under cover or at a cold start. Keep the phone still with a clear view of the sky; capture continues.',
  unavailable: 'The position could not be read. Try again; if it keeps failing, restart location on the phone.',
};

export function classifyLocationError(err: unknown): LocationProblem {
  const code = typeof (err as { code?: unknown })?.code === 'number' ? (err as { code: number }).code : null;
  const text = err instanceof Error ? err.message : typeof (err as { message?: unknown })?.message === 'string' ? (err as { message: string }).message : String(err);
  let kind: LocationErrorKind;
  if (code === 1 || /denied|permission/i.test(text)) kind = 'denied';
  else if (code === 3 || /time(d)?[ -]?out/i.test(text)) kind = 'timeout';
  else if (code === 2 || /disabled|not enabled|services|turned off|unavailable/i.test(text)) kind = 'off';
  else kind = 'unavailable';
  return { kind, message: MESSAGES[kind], detail: text };
}
