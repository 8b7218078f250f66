// What the sync screen shows, as one plain object the client publishes on every change.
import type { CrewRole } from './protocol.ts';

export type SyncStatus = 'offline' | 'syncing' | 'synced' | 'needs-attention';

/**
 * offline: no answer (network error or timeout); limited: the server answered but refused to work
 * (5xx, 429); online: an authenticated request succeeded (field-traps ).
 */
export type Connectivity = 'unknown' | 'offline' | 'limited' | 'online';

export type SyncErrorKind =
  | 'network' | 'timeout' | 'no-token' | 'auth' | 'forbidden' | 'app-out-of-date' | 'rate-limited'
  | 'server' | 'request' | 'bad-response' | 'store';

export interface SyncErrorInfo {
  kind: SyncErrorKind;
  message: string;
  /** HTTP status when the server answered. */
  status?: number;
  at: string;
}

export interface SyncState {
  status: SyncStatus;
  connectivity: Connectivity;
  /** Local changes the server has not acknowledged yet. */
  unsynced: number;
  /** Local changes the server refused (each with its reason in the store). */
  rejected: number;
  openConflicts: number;
  lastSuccessAt: string | null;
  lastAttemptAt: string | null;
  lastError: SyncErrorInfo | null;
  /** When the next automatic attempt is due (null while stopped or syncing). */
  nextAttemptAt: string | null;
  /** The server no longer serves this app build or protocol: "App out of date". */
  appOutOfDate: boolean;
  /** Server clock minus device clock at the last session check (ms), null before one. */
  clockOffsetMs: number | null;
  /** |clockOffsetMs| above the client's threshold: warn the crew (field-traps ). */
  clockWarning: boolean;
  role: CrewRole | null;
}

export const INITIAL_SYNC_STATE: SyncState = {
  status: 'offline',
  connectivity: 'unknown',
  unsynced: 0,
  rejected: 0,
  openConflicts: 0,
  lastSuccessAt: null,
  lastAttemptAt: null,
  lastError: null,
  nextAttemptAt: null,
  appOutOfDate: false,
  clockOffsetMs: null,
  clockWarning: false,
  role: null,
};
