// Import a campaign file (format "arcfield-campaign" v1) as a NEW campaign on this device: the
// whole file passes CampaignFileSchema first (every bad row listed, nothing stored from a rejected
// file — style.md §12), then every record and its change-log row go in ONE transaction.
// Record ids get fresh device-made UUIDv7s (a file imported twice must not collide on primary
// keys); exclusions are re-pointed at the new reading ids. The schema loads with the first import
// (load-record-checks.ts), not with the start screen that offers it.
import type { CampaignFile } from '../campaign/records.ts';
import { PROTOCOL_VERSION } from '../sync/protocol.ts';
import type { RecordKind } from '../campaign/records.ts';
import { SETTING_HLC } from './device-context.ts';
import type { FieldStore } from './field-store.ts';
import type { CampaignRecord } from './campaign-record.ts';
import type { ArcReadingRow, ChangeRow, ExclusionRow, LatitudeReadingRow, RowMeta, StationRow } from './rows.ts';
import { observedMsOf } from './schema-v2.ts';
import { loadRecordChecks } from './load-record-checks.ts';
import { classifyStorageError } from './storage-error.ts';
import { ValidationError, type Problem } from '../errors.ts';

/** Station codes unique; every reading names a station of the file. */
function checkReferences(file: CampaignFile, source: string): void {
  const problems: Problem[] = [];
  const codes = new Set<string>();
  file.stations.forEach((s, i) => {
    if (codes.has(s.code)) problems.push({ field: `stations[${i}].code`, value: s.code, reason: 'station code appears twice', source });
    codes.add(s.code);
  });
  file.latitudeReadings.forEach((r, i) => {
    if (!codes.has(r.station)) problems.push({ field: `latitudeReadings[${i}].station`, value: r.station, reason: 'no such station in the file', source });
  });
  file.arcReadings.forEach((r, i) => {
    for (const f of ['fromStation', 'toStation'] as const) {
      if (!codes.has(r[f])) problems.push({ field: `arcReadings[${i}].${f}`, value: r[f], reason: 'no such station in the file', source });
    }
  });
  if (problems.length) throw new ValidationError(problems, source);
}

export interface ImportSummary {
  campaignId: string;
  stations: number;
  latitudeReadings: number;
  arcReadings: number;
  exclusions: number;
}

export async function importCampaignFile(store: FieldStore, input: unknown, source = 'campaign file'): Promise<ImportSummary> {
  const { validateRecord, CampaignFileSchema } = await loadRecordChecks('campaign file', source);
  const file: CampaignFile = validateRecord(CampaignFileSchema, input, source);
  checkReferences(file, source);
  const { db, ctx } = store;
  const campaignId = ctx.newId();
  const nowMs = ctx.now();
  const changes: ChangeRow[] = [];
  const meta = (id: string): RowMeta => {
    const hlc = ctx.clock.tick();
    return { id, campaignId, changeId: ctx.newId(), hlc, deviceId: ctx.deviceId, baseHlc: null, deleted: 0, savedMs: nowMs };
  };
  const log = (kind: RecordKind, m: RowMeta, record: unknown): void => {
    changes.push({
      changeId: m.changeId, campaignId, recordKind: kind, recordId: m.id, op: 'put', record, hlc: m.hlc,
      deviceId: ctx.deviceId, baseHlc: null, protocolVersion: PROTOCOL_VERSION, state: 'pending', loggedMs: nowMs,
    });
  };

  const campaign: CampaignRecord = {
    id: campaignId, name: file.name, createdAt: new Date(nowMs).toISOString(),
    ...(file.description !== undefined ? { description: file.description } : {}),
    ...(file.settings !== undefined ? { settings: file.settings } : {}),
  };
  const campaignMeta = meta(campaignId);
  log('campaign', campaignMeta, campaign);

  const stations: StationRow[] = file.stations.map((s) => {
    const m = meta(ctx.newId());
    const record = { ...s, id: m.id };
    log('station', m, record);
    return { ...m, code: s.code, record };
  });
  const newIdOf = new Map<string, string>();
  const latitudeReadings: LatitudeReadingRow[] = file.latitudeReadings.map((r) => {
    const m = meta(ctx.newId());
    newIdOf.set(r.id, m.id);
    const record = { ...r, id: m.id };
    log('latitudeReading', m, record);
    return { ...m, station: r.station, observedMs: observedMsOf(r.observedAt), record };
  });
  const arcReadings: ArcReadingRow[] = file.arcReadings.map((r) => {
    const m = meta(ctx.newId());
    newIdOf.set(r.id, m.id);
    const record = { ...r, id: m.id };
    log('arcReading', m, record);
    return { ...m, fromStation: r.fromStation, toStation: r.toStation, observedMs: observedMsOf(r.observedAt), record };
  });
  const exclusions: ExclusionRow[] = (file.exclusions ?? []).map((e) => {
    const m = meta(ctx.newId());
    const record = { ...e, id: m.id, readingId: newIdOf.get(e.readingId) ?? e.readingId };
    log('exclusion', m, record);
    return { ...m, readingId: record.readingId, record };
  });

  try {
    await db.transaction('rw', [db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions, db.changes, db.settings], async () => {
      await db.campaigns.add({ ...campaignMeta, record: campaign });
      await db.stations.bulkAdd(stations);
      await db.latitudeReadings.bulkAdd(latitudeReadings);
      await db.arcReadings.bulkAdd(arcReadings);
      await db.exclusions.bulkAdd(exclusions);
      await db.changes.bulkAdd(changes);
      await db.settings.put({ key: SETTING_HLC, value: ctx.clock.current() });
    });
  } catch (err) {
    throw classifyStorageError(err, 'campaigns', campaignId);
  }
  return { campaignId, stations: stations.length, latitudeReadings: latitudeReadings.length, arcReadings: arcReadings.length, exclusions: exclusions.length };
}
