// SQLite adapter (better-sqlite3): the embedded default. WAL journal with synchronous=FULL, so a
// COMMIT that returned survives power loss (SQLite docs, "PRAGMA synchronous": FULL syncs the WAL
// on every commit). better-sqlite3 is synchronous, but the push rules are written once for both
// adapters as async code; every operation therefore runs through one FIFO queue, so no statement
// of another request can slip into an open transaction between two awaits.
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
import type { ConflictRecord } from '../sync/conflict.ts';
import {
  CHANGE_COLUMNS, CONFLICT_COLUMNS, changeFromRow, changeValues, conflictFromRow, conflictValues, pulledOf,
  recordFromRow, tokenFromRow, toJson, toSeq, type Row,
} from './row-codec.ts';
import { SQLITE_MIGRATIONS, type Migration } from './sqlite-migrations.ts';
import type { CampaignRow, PullPage, PushTx, StoredChange, StoredRecord, SyncStorage, TokenRow } from './storage.ts';
import { SchemaVersionError } from './schema-version-error.ts';

const placeholders = (n: number) => Array.from({ length: n }, () => '?').join(', ');

export interface SqliteStorageOptions {
  /** Applied migrations (tests pass a prefix to build an old schema). */
  migrations?: readonly Migration[];
}

export class SqliteStorage implements SyncStorage {
  readonly kind = 'sqlite' as const;
  private readonly db: Database.Database;
  private queue: Promise<unknown> = Promise.resolve();
  private readonly migrations: readonly Migration[];

  constructor(readonly path: string, opts: SqliteStorageOptions = {}) {
    if (path !== ':memory:') mkdirSync(dirname(path), { recursive: true });
    this.db = new Database(path);
    this.db.pragma('journal_mode = WAL');
    this.db.pragma('synchronous = FULL');
    this.db.pragma('foreign_keys = ON');
    this.db.pragma('busy_timeout = 5000');
    this.migrations = opts.migrations ?? SQLITE_MIGRATIONS;
  }

  /** Run `fn` after every earlier operation has finished (FIFO). */
  private serial<T>(fn: () => Promise<T> | T): Promise<T> {
    const run = this.queue.then(fn, fn);
    this.queue = run.then(() => undefined, () => undefined);
    return run;
  }

  /** Prepared once per SQL text: preparing costs more than running these small statements. */
  private readonly statements = new Map<string, Database.Statement>();
  private stmt(sql: string): Database.Statement {
    let st = this.statements.get(sql);
    if (!st) {
      st = this.db.prepare(sql);
      this.statements.set(sql, st);
    }
    return st;
  }
  private all(sql: string, ...params: unknown[]): Row[] {
    return this.stmt(sql).all(...params) as Row[];
  }
  private one(sql: string, ...params: unknown[]): Row | undefined {
    return this.stmt(sql).get(...params) as Row | undefined;
  }
  private run(sql: string, ...params: unknown[]): number {
    return this.stmt(sql).run(...params).changes;
  }

  async migrate(): Promise<number> {
    return this.serial(() => {
      this.db.exec('CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY, description TEXT NOT NULL, applied_at TEXT NOT NULL)');
      const current = this.currentVersion();
      const known = this.migrations.at(-1)?.version ?? 0;
      if (current > known) throw new SchemaVersionError(current, known);
      for (const m of this.migrations) {
        if (m.version <= current) continue;
        // Each migration in its own transaction: a failure leaves the previous version intact.
        this.db.transaction(() => {
          for (const s of m.statements) this.db.exec(s);
          this.run('INSERT INTO schema_migrations (version, description, applied_at) VALUES (?, ?, ?)', m.version, m.description, new Date().toISOString());
        }).immediate();
      }
      return this.currentVersion();
    });
  }

  private currentVersion(): number {
    const r = this.one('SELECT MAX(version) AS v FROM schema_migrations');
    return r && r.v !== null ? Number(r.v) : 0;
  }

  async schemaVersion(): Promise<number> {
    return this.serial(() => {
      const t = this.one("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'schema_migrations'");
      return t ? this.currentVersion() : 0;
    });
  }

  async ping(): Promise<void> {
    await this.serial(() => this.one('SELECT 1 AS ok'));
  }

  async close(): Promise<void> {
    await this.serial(() => this.db.close());
  }

  async pushTransaction<T>(fn: (tx: PushTx) => Promise<T>): Promise<T> {
    return this.serial(async () => {
      this.db.exec('BEGIN IMMEDIATE');
      try {
        const result = await fn(this.tx);
        this.db.exec('COMMIT');
        return result;
      } catch (err) {
        if (this.db.inTransaction) this.db.exec('ROLLBACK');
        throw err;
      }
    });
  }

  private readonly tx: PushTx = {
    lockCampaign: async (id) => {
      // BEGIN IMMEDIATE already holds SQLite's single write lock.
      const r = this.one('SELECT id, name, created_at, last_seq FROM campaigns WHERE id = ?', id);
      return r ? campaignFromRow(r) : null;
    },
    setLastSeq: async (id, seq) => {
      this.run('UPDATE campaigns SET last_seq = ? WHERE id = ?', seq, id);
    },
    findChange: async (changeId) => {
      const r = this.one('SELECT * FROM changes WHERE change_id = ?', changeId);
      return r ? changeFromRow(r) : null;
    },
    insertChange: async (c: StoredChange) => {
      this.run(`INSERT INTO changes (${CHANGE_COLUMNS.join(', ')}) VALUES (${placeholders(CHANGE_COLUMNS.length)})`, ...changeValues(c, c.clockSkewFlag ? 1 : 0));
    },
    findRecord: async (campaignId, kind, recordId) => {
      const r = this.one('SELECT * FROM records WHERE campaign_id = ? AND record_kind = ? AND record_id = ?', campaignId, kind, recordId);
      return r ? recordFromRow(r) : null;
    },
    putRecord: async (campaignId, rec: StoredRecord) => {
      this.run(`INSERT INTO records (campaign_id, record_kind, record_id, change_id, hlc, device_id, deleted, base_hlc, record, server_seq)
                VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)
                ON CONFLICT (campaign_id, record_kind, record_id) DO UPDATE SET change_id = excluded.change_id, hlc = excluded.hlc,
                  device_id = excluded.device_id, deleted = excluded.deleted, base_hlc = excluded.base_hlc, record = excluded.record,
                  server_seq = excluded.server_seq`,
      campaignId, rec.recordKind, rec.recordId, rec.version.changeId, rec.version.hlc, rec.version.deviceId, rec.version.deleted ? 1 : 0,
      rec.version.baseHlc, toJson(rec.record), rec.serverSeq);
    },
    findConflict: async (conflictId) => {
      const r = this.one('SELECT * FROM conflicts WHERE conflict_id = ?', conflictId);
      return r ? conflictFromRow(r) : null;
    },
    upsertConflict: async (c: ConflictRecord) => {
      const set = CONFLICT_COLUMNS.slice(1).map((col) => `${col} = excluded.${col}`).join(', ');
      this.run(`INSERT INTO conflicts (${CONFLICT_COLUMNS.join(', ')}) VALUES (${placeholders(CONFLICT_COLUMNS.length)})
                ON CONFLICT (conflict_id) DO UPDATE SET ${set}`, ...conflictValues(c));
    },
  };

  async pull(campaignId: string, after: number, limit: number): Promise<PullPage> {
    return this.serial(() => {
      const rows = this.all('SELECT * FROM changes WHERE campaign_id = ? AND server_seq > ? ORDER BY server_seq LIMIT ?', campaignId, after, limit + 1);
      const hasMore = rows.length > limit;
      const changes = rows.slice(0, limit).map((r) => pulledOf(changeFromRow(r)));
      const nextCursor = changes.length > 0 ? changes[changes.length - 1].serverSeq : after;
      const conflicts = changes.length === 0 ? [] : this.all(
        'SELECT * FROM conflicts WHERE campaign_id = ? AND server_seq > ? AND server_seq <= ? ORDER BY server_seq', campaignId, after, nextCursor,
      ).map(conflictFromRow);
      return { changes, conflicts, nextCursor, hasMore };
    });
  }

  async createCampaign(c: { id: string; name: string; createdAt: string }, firstToken: TokenRow): Promise<void> {
    await this.serial(() => this.db.transaction(() => {
      this.run('INSERT INTO campaigns (id, name, created_at, last_seq) VALUES (?, ?, ?, 0)', c.id, c.name, c.createdAt);
      this.insertTokenNow(firstToken);
    }).immediate());
  }

  async findCampaign(id: string): Promise<CampaignRow | null> {
    return this.serial(() => {
      const r = this.one('SELECT id, name, created_at, last_seq FROM campaigns WHERE id = ?', id);
      return r ? campaignFromRow(r) : null;
    });
  }

  private insertTokenNow(t: TokenRow): void {
    this.run('INSERT INTO tokens (id, campaign_id, token_hash, role, label, device_id, created_at, revoked_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
      t.id, t.campaignId, t.tokenHash, t.role, t.label, t.deviceId, t.createdAt, t.revokedAt);
  }

  async insertToken(t: TokenRow): Promise<void> {
    await this.serial(() => this.insertTokenNow(t));
  }

  async findTokenByHash(hash: string): Promise<TokenRow | null> {
    return this.serial(() => {
      const r = this.one('SELECT * FROM tokens WHERE token_hash = ?', hash);
      return r ? tokenFromRow(r) : null;
    });
  }

  async listTokens(campaignId: string): Promise<TokenRow[]> {
    return this.serial(() => this.all('SELECT * FROM tokens WHERE campaign_id = ? ORDER BY created_at, id', campaignId).map(tokenFromRow));
  }

  async bindTokenDevice(tokenId: string, deviceId: string): Promise<boolean> {
    return this.serial(() => {
      try {
        return this.run('UPDATE tokens SET device_id = ? WHERE id = ? AND device_id IS NULL AND revoked_at IS NULL', deviceId, tokenId) === 1;
      } catch (err) {
        // The unique index of migration 2: another live token of the campaign holds the device.
        if ((err as { code?: unknown }).code === 'SQLITE_CONSTRAINT_UNIQUE') return false;
        throw err;
      }
    });
  }

  async revokeToken(campaignId: string, tokenId: string, at: string): Promise<boolean> {
    return this.serial(() => this.run('UPDATE tokens SET revoked_at = ? WHERE id = ? AND campaign_id = ? AND revoked_at IS NULL', at, tokenId, campaignId) === 1);
  }

  async listConflicts(campaignId: string): Promise<ConflictRecord[]> {
    return this.serial(() => this.all('SELECT * FROM conflicts WHERE campaign_id = ? ORDER BY server_seq, conflict_id', campaignId).map(conflictFromRow));
  }

  async listRecords(campaignId: string): Promise<StoredRecord[]> {
    return this.serial(() => this.all('SELECT * FROM records WHERE campaign_id = ? ORDER BY record_kind, record_id', campaignId).map(recordFromRow));
  }

  async countChanges(campaignId: string): Promise<number> {
    return this.serial(() => toSeq(this.one('SELECT COUNT(*) AS n FROM changes WHERE campaign_id = ?', campaignId)?.n ?? 0));
  }
}

function campaignFromRow(r: Row): CampaignRow {
  return { id: String(r.id), name: String(r.name), createdAt: String(r.created_at), lastSeq: toSeq(r.last_seq) };
}
