// Row shapes of the device database. A row wraps one validated record (plain data, no class
// instances — style.md §10) with the bookkeeping sync needs: its campaign, the HLC stamp and the
// device of the last write, and a tombstone flag. Index fields are copied out of the record so
// Dexie can index them; `record` is the exact object that goes on the wire.
import type { ArcReading, Exclusion, LatitudeReading, RecordKind, Station } from '../campaign/records.ts';
import type { Change } from '../sync/protocol.ts';
import type { ConflictRecord } from '../sync/conflict.ts';
import type { CampaignRecord } from './campaign-record.ts';

export interface RowMeta {
  id: string;
  campaignId: string;
  /** The change that produced this version (merge.ts `RecordVersion.changeId`). */
  changeId: string;
  /** HLC stamp of the last write (local or merged from a pull). */
  hlc: string;
  deviceId: string;
  /** Stamp of the version this one was edited from (null for a create). */
  baseHlc: string | null;
  /** 1 = tombstone (a `delete` change); the row stays so a late, older `put` cannot resurrect it. */
  deleted: 0 | 1;
  /** Device time of the local write, epoch ms (display only; ordering uses `hlc`). */
  savedMs: number;
}

export interface CampaignRow extends RowMeta { record: CampaignRecord | null }
export interface StationRow extends RowMeta { code: string; record: Station | null }
export interface LatitudeReadingRow extends RowMeta { station: string; observedMs: number; record: LatitudeReading | null }
export interface ArcReadingRow extends RowMeta { fromStation: string; toStation: string; observedMs: number; record: ArcReading | null }
export interface ExclusionRow extends RowMeta { readingId: string; record: Exclusion | null }

export interface RecordRowByKind {
  campaign: CampaignRow;
  station: StationRow;
  latitudeReading: LatitudeReadingRow;
  arcReading: ArcReadingRow;
  exclusion: ExclusionRow;
}

export interface RecordByKind {
  campaign: CampaignRecord;
  station: Station & { id: string };
  latitudeReading: LatitudeReading;
  arcReading: ArcReading;
  exclusion: Exclusion;
}

/** Table name of each record kind. */
export const TABLE_OF_KIND = {
  campaign: 'campaigns',
  station: 'stations',
  latitudeReading: 'latitudeReadings',
  arcReading: 'arcReadings',
  exclusion: 'exclusions',
} as const satisfies Record<RecordKind, string>;

export type ChangeState = 'pending' | 'acked' | 'rejected' | 'pulled';

/** A change-log row: exactly a sync `Change`, plus local bookkeeping that never goes on the wire. */
export interface ChangeRow extends Change {
  /** Local order (auto-increment); the outbox is pushed oldest first. */
  seq?: number;
  state: ChangeState;
  rejectReason?: string;
  loggedMs: number;
}

/** One raw GNSS fix as the plugin delivered it, kept for audit whether accepted or not. */
export interface GnssFixRow {
  id: string;
  campaignId: string;
  /** The latitude reading averaged from this capture session; null until that reading is saved. */
  readingId: string | null;
  sessionId: string;
  latitudeDeg: number;
  longitudeDeg: number;
  accuracyM: number;
  altitudeM: number | null;
  altitudeAccuracyM: number | null;
  headingDeg: number | null;
  speedMps: number | null;
  /** Fix time from the plugin, epoch ms. */
  fixMs: number;
  /** Device time when the callback arrived, epoch ms. */
  receivedMs: number;
  platform: string;
  permission: 'precise' | 'coarse' | 'unknown';
  accepted: 0 | 1;
  rejectReason: string | null;
}

/** A concurrent edit that lost the merge, as the server published it (schema v2; keyed by conflictId). */
export type ConflictRow = ConflictRecord;

export interface SettingRow {
  key: string;
  value: unknown;
}
