// Schema version 1 of the device database — the first release. FROZEN: never edit a released
// version (field-traps ); a change of shape is a new version with an upgrade function.
// test/store/fixtures/schema-v1.json holds a copy; a test fails if this object drifts from it.
//
// Index strings use Dexie's notation: the first entry is the primary key, `&` unique,
// `[a+b]` compound. `deleted` is 0 | 1 (IndexedDB cannot index booleans) so list queries can
// skip tombstones through the index instead of filtering in memory.
export const SCHEMA_V1 = {
  campaigns: 'id, [deleted+id]',
  stations: 'id, [campaignId+deleted+code], [campaignId+deleted+id]',
  latitudeReadings: 'id, [campaignId+station+deleted], [campaignId+deleted+id]',
  arcReadings: 'id, [campaignId+fromStation], [campaignId+toStation], [campaignId+deleted+id]',
  exclusions: 'id, [campaignId+readingId+deleted], [campaignId+deleted+id]',
  gnssFixes: 'id, [campaignId+readingId], sessionId',
  changes: '++seq, &changeId, [state+campaignId+seq], [campaignId+seq], [recordKind+recordId]',
  settings: 'key',
} as const;

export const SCHEMA_V1_VERSION = 1;
