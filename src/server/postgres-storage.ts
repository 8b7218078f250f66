// PostgreSQL adapter (node-postgres) for shared deployments. Durability is the server's
// (synchronous_commit on by default: COMMIT returns after the WAL is flushed). Pushes to one
// campaign are serialised by locking its row (SELECT … FOR UPDATE), so server sequences are
// assigned and committed in order and a pull never sees seq n+1 before seq n. Every statement is
// parameterised; JSON goes in as text with an explicit ::jsonb cast (node-postgres would turn a JS
// array into a PostgreSQL array literal).
import pg from 'pg';
import type { ConflictRecord } from '../sync/conflict.ts';
import {
  CHANGE_COLUMNS, CONFLICT_COLUMNS, changeFromRow, changeValues, conflictFromRow, conflictValues, pulledOf,
  recordFromRow, tokenFromRow, toJson, toSeq, type Row,
} from './row-codec.ts';
import { POSTGRES_MIGRATIONS } from './postgres-migrations.ts';
import type { Migration } from './sqlite-migrations.ts';
import type { CampaignRow, PullPage, PushTx, StoredChange, StoredRecord, SyncStorage, TokenRow } from './storage.ts';
import { SchemaVersionError } from './schema-version-error.ts';

const JSON_COLUMNS = new Set(['record', 'resolves', 'loser', 'winner']);
const params = (cols: readonly string[]) => cols.map((c, i) => `$${i + 1}${JSON_COLUMNS.has(c) ? '::jsonb' : ''}`).join(', ');

/** Advisory-lock key that serialises concurrent migrations of one database (any fixed 64-bit value). */
const MIGRATION_LOCK_KEY = 7_240_119_021;

export interface PostgresStorageOptions {
  migrations?: readonly Migration[];
  /** Connections in the pool (default 10). */
  poolSize?: number;
}

type Q = pg.Pool | pg.PoolClient;

async function all(q: Q, sql: string, values: unknown[] = []): Promise<Row[]> {
  return (await q.query(sql, values)).rows as Row[];
}
async function one(q: Q, sql: string, values: unknown[] = []): Promise<Row | undefined> {
  return (await all(q, sql, values))[0];
}

export class PostgresStorage implements SyncStorage {
  readonly kind = 'postgres' as const;
  private readonly pool: pg.Pool;
  private readonly migrations: readonly Migration[];

  constructor(connectionString: string, opts: PostgresStorageOptions = {}) {
    this.pool = new pg.Pool({ connectionString, max: opts.poolSize ?? 10 });
    // An idle client that errors (server restart) must not crash the process; the next query reconnects.
    this.pool.on('error', () => undefined);
    this.migrations = opts.migrations ?? POSTGRES_MIGRATIONS;
  }

  private async inTransaction<T>(fn: (c: pg.PoolClient) => Promise<T>, mode = 'BEGIN'): Promise<T> {
    const client = await this.pool.connect();
    try {
      await client.query(mode);
      const result = await fn(client);
      await client.query('COMMIT');
      return result;
    } catch (err) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw err;
    } finally {
      client.release();
    }
  }

  async migrate(): Promise<number> {
    return this.inTransaction(async (c) => {
      await c.query('SELECT pg_advisory_xact_lock($1)', [MIGRATION_LOCK_KEY]);
      await c.query('CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY, description TEXT NOT NULL, applied_at TEXT NOT NULL)');
      const current = await this.versionWith(c);
      const known = this.migrations.at(-1)?.version ?? 0;
      if (current > known) throw new SchemaVersionError(current, known);
      for (const m of this.migrations) {
        if (m.version <= current) continue;
        // PostgreSQL DDL is transactional: a savepoint per migration keeps each one all-or-nothing.
        await c.query('SAVEPOINT migration');
        for (const s of m.statements) await c.query(s);
        await c.query('INSERT INTO schema_migrations (version, description, applied_at) VALUES ($1, $2, $3)', [m.version, m.description, new Date().toISOString()]);
        await c.query('RELEASE SAVEPOINT migration');
      }
      return this.versionWith(c);
    });
  }

  private async versionWith(q: Q): Promise<number> {
    const r = await one(q, 'SELECT MAX(version) AS v FROM schema_migrations');
    return r && r.v !== null ? Number(r.v) : 0;
  }

  async schemaVersion(): Promise<number> {
    const t = await one(this.pool, "SELECT to_regclass('schema_migrations') AS t");
    return t && t.t !== null ? this.versionWith(this.pool) : 0;
  }

  async ping(): Promise<void> {
    await this.pool.query('SELECT 1');
  }

  async close(): Promise<void> {
    await this.pool.end();
  }

  async pushTransaction<T>(fn: (tx: PushTx) => Promise<T>): Promise<T> {
    return this.inTransaction((c) => fn(this.txFor(c)));
  }

  private txFor(c: pg.PoolClient): PushTx {
    return {
      lockCampaign: async (id) => {
        const r = await one(c, 'SELECT id, name, created_at, last_seq FROM campaigns WHERE id = $1 FOR UPDATE', [id]);
        return r ? campaignFromRow(r) : null;
      },
      setLastSeq: async (id, seq) => {
        await c.query('UPDATE campaigns SET last_seq = $1 WHERE id = $2', [seq, id]);
      },
      findChange: async (changeId) => {
        const r = await one(c, 'SELECT * FROM changes WHERE change_id = $1', [changeId]);
        return r ? changeFromRow(r) : null;
      },
      insertChange: async (ch: StoredChange) => {
        await c.query(`INSERT INTO changes (${CHANGE_COLUMNS.join(', ')}) VALUES (${params(CHANGE_COLUMNS)})`, changeValues(ch, ch.clockSkewFlag === true));
      },
      findRecord: async (campaignId, kind, recordId) => {
        const r = await one(c, 'SELECT * FROM records WHERE campaign_id = $1 AND record_kind = $2 AND record_id = $3', [campaignId, kind, recordId]);
        return r ? recordFromRow(r) : null;
      },
      putRecord: async (campaignId, rec: StoredRecord) => {
        await c.query(`INSERT INTO records (campaign_id, record_kind, record_id, change_id, hlc, device_id, deleted, base_hlc, record, server_seq)
                       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9::jsonb, $10)
                       ON CONFLICT (campaign_id, record_kind, record_id) DO UPDATE SET change_id = EXCLUDED.change_id, hlc = EXCLUDED.hlc,
                         device_id = EXCLUDED.device_id, deleted = EXCLUDED.deleted, base_hlc = EXCLUDED.base_hlc, record = EXCLUDED.record,
                         server_seq = EXCLUDED.server_seq`,
        [campaignId, rec.recordKind, rec.recordId, rec.version.changeId, rec.version.hlc, rec.version.deviceId, rec.version.deleted,
          rec.version.baseHlc, toJson(rec.record), rec.serverSeq]);
      },
      findConflict: async (conflictId) => {
        const r = await one(c, 'SELECT * FROM conflicts WHERE conflict_id = $1', [conflictId]);
        return r ? conflictFromRow(r) : null;
      },
      upsertConflict: async (cf: ConflictRecord) => {
        const set = CONFLICT_COLUMNS.slice(1).map((col) => `${col} = EXCLUDED.${col}`).join(', ');
        await c.query(`INSERT INTO conflicts (${CONFLICT_COLUMNS.join(', ')}) VALUES (${params(CONFLICT_COLUMNS)})
                       ON CONFLICT (conflict_id) DO UPDATE SET ${set}`, conflictValues(cf));
      },
    };
  }

  async pull(campaignId: string, after: number, limit: number): Promise<PullPage> {
    // One snapshot for both reads, so the conflicts match the page of changes.
    return this.inTransaction(async (c) => {
      const rows = await all(c, 'SELECT * FROM changes WHERE campaign_id = $1 AND server_seq > $2 ORDER BY server_seq LIMIT $3', [campaignId, after, limit + 1]);
      const hasMore = rows.length > limit;
      const changes = rows.slice(0, limit).map((r) => pulledOf(changeFromRow(r)));
      const nextCursor = changes.length > 0 ? changes[changes.length - 1].serverSeq : after;
      const conflicts = changes.length === 0 ? [] : (await all(c,
        'SELECT * FROM conflicts WHERE campaign_id = $1 AND server_seq > $2 AND server_seq <= $3 ORDER BY server_seq', [campaignId, after, nextCursor],
      )).map(conflictFromRow);
      return { changes, conflicts, nextCursor, hasMore };
    }, 'BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
  }

  async createCampaign(cp: { id: string; name: string; createdAt: string }, firstToken: TokenRow): Promise<void> {
    await this.inTransaction(async (c) => {
      await c.query('INSERT INTO campaigns (id, name, created_at, last_seq) VALUES ($1, $2, $3, 0)', [cp.id, cp.name, cp.createdAt]);
      await insertToken(c, firstToken);
    });
  }

  async findCampaign(id: string): Promise<CampaignRow | null> {
    const r = await one(this.pool, 'SELECT id, name, created_at, last_seq FROM campaigns WHERE id = $1', [id]);
    return r ? campaignFromRow(r) : null;
  }

  async insertToken(t: TokenRow): Promise<void> {
    await insertToken(this.pool, t);
  }

  async findTokenByHash(hash: string): Promise<TokenRow | null> {
    const r = await one(this.pool, 'SELECT * FROM tokens WHERE token_hash = $1', [hash]);
    return r ? tokenFromRow(r) : null;
  }

  async listTokens(campaignId: string): Promise<TokenRow[]> {
    return (await all(this.pool, 'SELECT * FROM tokens WHERE campaign_id = $1 ORDER BY created_at, id', [campaignId])).map(tokenFromRow);
  }

  async bindTokenDevice(tokenId: string, deviceId: string): Promise<boolean> {
    try {
      const r = await this.pool.query('UPDATE tokens SET device_id = $1 WHERE id = $2 AND device_id IS NULL AND revoked_at IS NULL', [deviceId, tokenId]);
      return r.rowCount === 1;
    } catch (err) {
      if ((err as { code?: unknown }).code === '23505') return false; // unique_violation: the device has a live token
      throw err;
    }
  }

  async revokeToken(campaignId: string, tokenId: string, at: string): Promise<boolean> {
    const r = await this.pool.query('UPDATE tokens SET revoked_at = $1 WHERE id = $2 AND campaign_id = $3 AND revoked_at IS NULL', [at, tokenId, campaignId]);
    return r.rowCount === 1;
  }

  async listConflicts(campaignId: string): Promise<ConflictRecord[]> {
    return (await all(this.pool, 'SELECT * FROM conflicts WHERE campaign_id = $1 ORDER BY server_seq, conflict_id', [campaignId])).map(conflictFromRow);
  }

  async listRecords(campaignId: string): Promise<StoredRecord[]> {
    return (await all(this.pool, 'SELECT * FROM records WHERE campaign_id = $1 ORDER BY record_kind, record_id', [campaignId])).map(recordFromRow);
  }

  async countChanges(campaignId: string): Promise<number> {
    return toSeq((await one(this.pool, 'SELECT COUNT(*) AS n FROM changes WHERE campaign_id = $1', [campaignId]))?.n ?? 0);
  }
}

async function insertToken(q: Q, t: TokenRow): Promise<void> {
  await q.query('INSERT INTO tokens (id, campaign_id, token_hash, role, label, device_id, created_at, revoked_at) VALUES ($1, $2, $3, $4, $5, $6, $7, $8)',
    [t.id, t.campaignId, t.tokenHash, t.role, t.label, t.deviceId, t.createdAt, t.revokedAt]);
}

function campaignFromRow(r: Row): CampaignRow {
  return { id: String(r.id), name: String(r.name), createdAt: String(r.created_at), lastSeq: toSeq(r.last_seq) };
}
