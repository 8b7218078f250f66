// A campaign's records together with its change-log position, read in one transaction: the CSV
// import builds its file from the records and passes the position back as `expectedSeq`, so a
// save or a sync that lands between the check and the import is noticed instead of undone.
import type { CampaignRecords } from '../campaign/records.ts';
import type { ArcfieldDb } from './arcfield-db.ts';
import { lastChangeSeq } from './campaign-mirror.ts';
import { loadCampaignRecords } from './campaign-queries.ts';

export interface CampaignSnapshot {
  records: CampaignRecords;
  /** The campaign's last change-log sequence when the records were read (every write adds a row). */
  seq: number;
}

export async function loadCampaignSnapshot(db: ArcfieldDb, campaignId: string): Promise<CampaignSnapshot | undefined> {
  return db.transaction('r', [db.changes, db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions], async () => {
    const records = await loadCampaignRecords(db, campaignId);
    return records ? { records, seq: await lastChangeSeq(db, campaignId) } : undefined;
  });
}
