// PostgreSQL for the integration tests: ARCFIELD_TEST_PG_URL (set by scripts/test-all.js from
// scripts/pg-start.sh). Each suite gets its own schema (search_path in the connection options), so
// suites never see each other's rows and the migration tests start from an empty database.
// Without the variable the PostgreSQL suites are skipped with a loud message — except under CI,
// where a missing database is a failure, not a skip.
import pg from 'pg';

export const PG_URL = process.env.ARCFIELD_TEST_PG_URL;

export function pgRequiredButMissing(): boolean {
  return !PG_URL && Boolean(process.env.CI);
}

export function announcePgSkip(what: string): void {
  if (!PG_URL && !process.env.CI) {
    console.warn(`\n*** SKIPPING PostgreSQL ${what}: ARCFIELD_TEST_PG_URL is not set. ` +
      'Run: eval "$(bash scripts/pg-start.sh)"; npx vitest run test/server; bash scripts/pg-stop.sh ***\n');
  }
}

export interface PgSchema {
  url: string;
  drop(): Promise<void>;
}

export async function freshPgSchema(tag: string): Promise<PgSchema> {
  if (!PG_URL) throw new Error('ARCFIELD_TEST_PG_URL is not set');
  const schema = `t_${tag}_${process.pid}_${Math.floor(performance.now())}`.replace(/[^a-z0-9_]/gi, '_').toLowerCase();
  const admin = new pg.Client({ connectionString: PG_URL });
  await admin.connect();
  try {
    await admin.query(`CREATE SCHEMA ${schema}`);
  } finally {
    await admin.end();
  }
  const sep = PG_URL.includes('?') ? '&' : '?';
  return {
    url: `${PG_URL}${sep}options=${encodeURIComponent(`-c search_path=${schema}`)}`,
    drop: async () => {
      const c = new pg.Client({ connectionString: PG_URL });
      await c.connect();
      try {
        await c.query(`DROP SCHEMA ${schema} CASCADE`);
      } finally {
        await c.end();
      }
    },
  };
}
