// Shared test fixtures for the server and sync tests: a temp SQLite file, a PostgreSQL database
// when ARCFIELD_TEST_PG_URL is set, and builders of valid changes with invented data (stations
// K01…K09 of an invented campaign; no real places).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { formatHlc } from '../../../src/sync/hlc.ts';
import { PROTOCOL_VERSION, type Change } from '../../../src/sync/protocol.ts';
import { SqliteStorage } from '../../../src/server/sqlite-storage.ts';

export interface TempSqlite {
  path: string;
  open(): SqliteStorage;
  cleanup(): void;
}

export function tempSqlite(): TempSqlite {
  const dir = mkdtempSync(join(tmpdir(), 'arcfield-sqlite-'));
  const path = join(dir, 'sync.sqlite');
  return { path, open: () => new SqliteStorage(path), cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

let counter = 0;
/** A unique, valid id for tests (change and record ids). */
export function tid(prefix: string): string {
  counter += 1;
  return `${prefix}-${String(counter).padStart(6, '0')}`;
}

export const stamp = (ms: number, c = 0): string => formatHlc({ wallMs: ms, counter: c });

/** A valid latitude reading at an invented station. */
export function latitudeRecord(id: string, latitudeDeg = 41.2, station = 'K01'): Record<string, unknown> {
  return { id, station, kind: 'astronomic', latitudeDeg, sigmaArcsec: 0.4, observedAt: '2026-03-02T21:15:00Z' };
}

export function putChange(campaignId: string, deviceId: string, recordId: string, record: unknown, hlc: string, baseHlc: string | null = null,
  kind: Change['recordKind'] = 'latitudeReading'): Change {
  return { changeId: tid('chg'), campaignId, recordKind: kind, recordId, op: 'put', record, hlc, deviceId, baseHlc, protocolVersion: PROTOCOL_VERSION };
}

export function deleteChange(campaignId: string, deviceId: string, recordId: string, hlc: string, baseHlc: string | null,
  kind: Change['recordKind'] = 'latitudeReading'): Change {
  return { changeId: tid('chg'), campaignId, recordKind: kind, recordId, op: 'delete', record: null, hlc, deviceId, baseHlc, protocolVersion: PROTOCOL_VERSION };
}

export const bearer = (token: string) => ({ authorization: `Bearer ${token}` });
