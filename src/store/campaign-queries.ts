// Reads for the screens and the solver. List screens page through an index with offset + limit
// and count with `.count()`; nothing here loads a whole table except `loadCampaignRecords`, which
// the solver needs in full (field-traps ). Tombstones are skipped through the index.
import { Dexie } from 'dexie';
import type { CampaignRecords, Exclusion, LatitudeReading, ArcReading, Station } from '../campaign/records.ts';
import type { ArcfieldDb } from './arcfield-db.ts';
import type { ArcReadingRow, CampaignRow, ExclusionRow, LatitudeReadingRow, StationRow } from './rows.ts';

export interface CampaignOverview {
  id: string;
  name: string;
  description?: string;
  stationCount: number;
  latitudeReadingCount: number;
  arcReadingCount: number;
  /** Device time of the last change to anything in the campaign (local or pulled), epoch ms. */
  lastActivityMs: number;
}

const live = (campaignId: string) => [[campaignId, 0, Dexie.minKey], [campaignId, 0, Dexie.maxKey]] as const;

export async function listCampaigns(db: ArcfieldDb): Promise<CampaignOverview[]> {
  const rows = await db.campaigns.where('[deleted+id]').between([0, Dexie.minKey], [0, Dexie.maxKey]).toArray();
  const out = await Promise.all(rows.map((row) => overviewOf(db, row)));
  return out.sort((a, b) => b.lastActivityMs - a.lastActivityMs);
}

async function overviewOf(db: ArcfieldDb, row: CampaignRow): Promise<CampaignOverview> {
  const [stationCount, latitudeReadingCount, arcReadingCount, last] = await Promise.all([
    db.stations.where('[campaignId+deleted+id]').between(...live(row.id)).count(),
    db.latitudeReadings.where('[campaignId+deleted+id]').between(...live(row.id)).count(),
    db.arcReadings.where('[campaignId+deleted+id]').between(...live(row.id)).count(),
    db.changes.where('[campaignId+seq]').between([row.id, Dexie.minKey], [row.id, Dexie.maxKey]).last(),
  ]);
  return {
    id: row.id, name: row.record?.name ?? '(unnamed)', description: row.record?.description,
    stationCount, latitudeReadingCount, arcReadingCount, lastActivityMs: last?.loggedMs ?? row.savedMs,
  };
}

export async function getCampaign(db: ArcfieldDb, id: string): Promise<CampaignRow | undefined> {
  const row = await db.campaigns.get(id);
  return row && !row.deleted ? row : undefined;
}

/** Stations of a campaign in code order (campaigns hold tens of stations, not thousands). */
export async function stationsOf(db: ArcfieldDb, campaignId: string): Promise<StationRow[]> {
  return db.stations.where('[campaignId+deleted+code]').between(...live(campaignId)).toArray();
}

export async function stationByCode(db: ArcfieldDb, campaignId: string, code: string): Promise<StationRow | undefined> {
  return db.stations.where('[campaignId+deleted+code]').equals([campaignId, 0, code]).first();
}

export async function latitudeReadingsOfStation(db: ArcfieldDb, campaignId: string, code: string): Promise<LatitudeReadingRow[]> {
  const rows = await db.latitudeReadings.where('[campaignId+station+deleted]').equals([campaignId, code, 0]).toArray();
  return rows.sort((a, b) => a.observedMs - b.observedMs);
}

export async function arcReadingsOfStation(db: ArcfieldDb, campaignId: string, code: string): Promise<ArcReadingRow[]> {
  const [from, to] = await Promise.all([
    db.arcReadings.where('[campaignId+fromStation]').equals([campaignId, code]).toArray(),
    db.arcReadings.where('[campaignId+toStation]').equals([campaignId, code]).toArray(),
  ]);
  return [...from, ...to].filter((r) => !r.deleted);
}

export type ReadingKind = 'latitude' | 'arc';

export interface ReadingPage<R> {
  rows: R[];
  offset: number;
  total: number;
}

/** One page of a campaign's readings in observation order (index [campaignId+deleted+observedMs]). */
export async function readingPage(db: ArcfieldDb, campaignId: string, kind: 'latitude', offset: number, limit: number): Promise<ReadingPage<LatitudeReadingRow>>;
export async function readingPage(db: ArcfieldDb, campaignId: string, kind: 'arc', offset: number, limit: number): Promise<ReadingPage<ArcReadingRow>>;
export async function readingPage(db: ArcfieldDb, campaignId: string, kind: ReadingKind, offset: number, limit: number): Promise<ReadingPage<LatitudeReadingRow | ArcReadingRow>> {
  const table = kind === 'latitude' ? db.latitudeReadings : db.arcReadings;
  const index = table.where('[campaignId+deleted+observedMs]').between(...live(campaignId));
  const [rows, total] = await Promise.all([
    index.offset(offset).limit(limit).toArray(),
    table.where('[campaignId+deleted+observedMs]').between(...live(campaignId)).count(),
  ]);
  return { rows, offset, total };
}

/** Live readings of one kind in a campaign (an index count, no rows loaded). */
export async function countReadings(db: ArcfieldDb, campaignId: string, kind: ReadingKind): Promise<number> {
  const table = kind === 'latitude' ? db.latitudeReadings : db.arcReadings;
  return table.where('[campaignId+deleted+id]').between(...live(campaignId)).count();
}

export async function exclusionsOf(db: ArcfieldDb, campaignId: string): Promise<ExclusionRow[]> {
  return db.exclusions.where('[campaignId+deleted+id]').between(...live(campaignId)).toArray();
}

function records<R>(rows: readonly { record: R | null; deleted: 0 | 1 }[]): R[] {
  const out: R[] = [];
  for (const r of rows) if (!r.deleted && r.record) out.push(r.record);
  return out;
}

/** Everything `solveCampaign` needs, as plain records (tombstones left out). */
export async function loadCampaignRecords(db: ArcfieldDb, campaignId: string): Promise<CampaignRecords | undefined> {
  return db.transaction('r', [db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions], async () => {
    const campaign = await getCampaign(db, campaignId);
    if (!campaign?.record) return undefined;
    const [stations, latitudeReadings, arcReadings, exclusions] = await Promise.all([
      db.stations.where('[campaignId+deleted+id]').between(...live(campaignId)).toArray(),
      db.latitudeReadings.where('[campaignId+deleted+id]').between(...live(campaignId)).toArray(),
      db.arcReadings.where('[campaignId+deleted+id]').between(...live(campaignId)).toArray(),
      db.exclusions.where('[campaignId+deleted+id]').between(...live(campaignId)).toArray(),
    ]);
    return {
      name: campaign.record.name,
      settings: campaign.record.settings,
      stations: records<Station>(stations),
      latitudeReadings: records<LatitudeReading>(latitudeReadings),
      arcReadings: records<ArcReading>(arcReadings),
      exclusions: records<Exclusion>(exclusions),
    };
  });
}
