// Public surface of the sync server: the app factory, bootstrap, storage adapters and their port.
export { createServer, DEFAULT_LIMITS, DEFAULT_CORS_ORIGINS, type ServerOptions, type ServerLimits } from './create-server.ts';
export { createCampaign, type CreatedCampaign } from './create-campaign.ts';
export { openStorage, storageFor, describeDatabase, DEFAULT_DATABASE } from './open-storage.ts';
export { SqliteStorage } from './sqlite-storage.ts';
export { PostgresStorage } from './postgres-storage.ts';
export { SQLITE_MIGRATIONS, type Migration } from './sqlite-migrations.ts';
export { POSTGRES_MIGRATIONS } from './postgres-migrations.ts';
export { SchemaVersionError } from './schema-version-error.ts';
export { pushBatch, CampaignNotFoundError, type PushContext } from './push-batch.ts';
export { newToken, hashToken, TOKEN_PREFIX } from './tokens.ts';
export { TokenBuckets, type BucketLimits } from './token-bucket.ts';
export { DEFAULT_RECORD_SCHEMAS, type RecordSchemas } from './validate-change.ts';
export type * from './storage.ts';
