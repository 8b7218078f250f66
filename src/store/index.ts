// The device store: Dexie database, versioned schema, repositories, the change log.
export { ArcfieldDb, DB_SCHEMA_VERSION, DEFAULT_DB_NAME, durabilityOf, type IndexedDbDeps } from './arcfield-db.ts';
export { SCHEMA_V1, SCHEMA_V1_VERSION } from './schema-v1.ts';
export { SCHEMA_V2, SCHEMA_V2_VERSION, observedMsOf } from './schema-v2.ts';
export { CampaignRecordSchema, type CampaignRecord } from './campaign-record.ts';
export type * from './rows.ts';
export { TABLE_OF_KIND } from './rows.ts';
export { commitRecord, SAVE_WATCHDOG_MS } from './commit-record.ts';
export { loadDeviceContext, SETTING_DEVICE_ID, SETTING_HLC, type DeviceContext } from './device-context.ts';
export {
  FieldStore, openFieldStore, type FieldStoreOptions, type NewCampaign, type StationInput,
  type LatitudeReadingInput, type ArcReadingInput,
} from './field-store.ts';
export {
  listCampaigns, getCampaign, stationsOf, stationByCode, latitudeReadingsOfStation, arcReadingsOfStation,
  readingPage, countReadings, exclusionsOf, loadCampaignRecords, type CampaignOverview, type ReadingPage, type ReadingKind,
} from './campaign-queries.ts';
export { importCampaignFile, type ImportSummary } from './import-campaign.ts';
export { importRows, IMPORT_WATCHDOG_MS_PER_RECORD, type ImportRowsOptions, type ImportRowsSummary } from './import-rows.ts';
export { planImport, sameRecord, IMPORT_COLLECTIONS, type ImportCollection, type ImportCounts, type ImportPlan } from './import-plan.ts';
export { loadCampaignSnapshot, type CampaignSnapshot } from './campaign-snapshot.ts';
export { StorageError, classifyStorageError, errorNameChain, type StorageErrorKind } from './storage-error.ts';
export {
  storageStatus, requestPersistenceOnce, browserStorage, STORAGE_WARN_FRACTION, SETTING_PERSIST,
  SETTING_LAST_SYNC_PREFIX, type StorageStatus, type StorageManagerLike,
} from './storage-status.ts';
export { readSetting, writeSetting, updateSetting, saveDraft, loadDraft, clearDraft, DRAFT_PREFIX } from './local-settings.ts';
export { validateRecord } from './validate-record.ts';
export { loadRecordChecks, RecordChecksUnavailableError, type RecordChecksModule } from './load-record-checks.ts';
export { DexieSyncStore, toWireChange, SETTING_CURSOR_PREFIX } from './dexie-sync-store.ts';
export { CampaignMirror, lastChangeSeq, type MirrorRefresh } from './campaign-mirror.ts';
