// Schema migrations of the PostgreSQL store, in step with sqlite-migrations.ts (same versions, same
// meaning). A released migration is never edited; a schema change is a new entry.
import type { Migration } from './sqlite-migrations.ts';

export const POSTGRES_MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    description: 'campaigns, tokens, change log, current records, conflicts',
    statements: [
      `CREATE TABLE campaigns (
         id TEXT PRIMARY KEY, name TEXT NOT NULL, created_at TEXT NOT NULL,
         last_seq BIGINT NOT NULL DEFAULT 0)`,
      `CREATE TABLE tokens (
         id TEXT PRIMARY KEY, campaign_id TEXT NOT NULL REFERENCES campaigns(id),
         token_hash TEXT NOT NULL UNIQUE,
         role TEXT NOT NULL CHECK (role IN ('observer', 'lead', 'viewer')),
         label TEXT NOT NULL, device_id TEXT, created_at TEXT NOT NULL, revoked_at TEXT)`,
      `CREATE INDEX tokens_by_campaign ON tokens (campaign_id)`,
      `CREATE TABLE changes (
         change_id TEXT PRIMARY KEY, campaign_id TEXT NOT NULL REFERENCES campaigns(id),
         server_seq BIGINT NOT NULL, record_kind TEXT NOT NULL, record_id TEXT NOT NULL,
         op TEXT NOT NULL CHECK (op IN ('put', 'delete')), record JSONB, hlc TEXT NOT NULL,
         device_id TEXT NOT NULL, base_hlc TEXT, protocol_version INTEGER NOT NULL, resolves JSONB,
         received_at TEXT NOT NULL, clock_ahead BOOLEAN NOT NULL, outcome TEXT NOT NULL,
         content_hash TEXT NOT NULL, UNIQUE (campaign_id, server_seq))`,
      `CREATE TABLE records (
         campaign_id TEXT NOT NULL REFERENCES campaigns(id), record_kind TEXT NOT NULL,
         record_id TEXT NOT NULL, change_id TEXT NOT NULL, hlc TEXT NOT NULL, device_id TEXT NOT NULL,
         deleted BOOLEAN NOT NULL, base_hlc TEXT, record JSONB, server_seq BIGINT NOT NULL,
         PRIMARY KEY (campaign_id, record_kind, record_id))`,
      `CREATE TABLE conflicts (
         conflict_id TEXT PRIMARY KEY, campaign_id TEXT NOT NULL REFERENCES campaigns(id),
         record_kind TEXT NOT NULL, record_id TEXT NOT NULL, reason TEXT NOT NULL, loser JSONB NOT NULL,
         winner JSONB NOT NULL, status TEXT NOT NULL, resolved_by TEXT, server_seq BIGINT NOT NULL,
         detected_at TEXT NOT NULL, resolved_at TEXT)`,
      `CREATE INDEX conflicts_by_seq ON conflicts (campaign_id, server_seq)`,
    ],
  },
  {
    version: 2,
    description: 'one live token per device in a campaign (older duplicates revoked first)',
    statements: [
      `UPDATE tokens SET revoked_at = to_char(now() AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')
         WHERE revoked_at IS NULL AND device_id IS NOT NULL AND EXISTS (
           SELECT 1 FROM tokens t2 WHERE t2.campaign_id = tokens.campaign_id AND t2.device_id = tokens.device_id
             AND t2.revoked_at IS NULL AND (t2.created_at > tokens.created_at OR (t2.created_at = tokens.created_at AND t2.id > tokens.id)))`,
      `CREATE UNIQUE INDEX tokens_live_device ON tokens (campaign_id, device_id)
         WHERE revoked_at IS NULL AND device_id IS NOT NULL`,
    ],
  },
];
