// The records a screen holds (CampaignRecords from the store) as a campaign file, for the report and the CSV import.
import { CAMPAIGN_FILE_FORMAT, CAMPAIGN_FILE_VERSION, type CampaignFile, type CampaignRecords } from '../../campaign/records.ts';

export function campaignFileOf(records: CampaignRecords): CampaignFile {
  return {
    format: CAMPAIGN_FILE_FORMAT, version: CAMPAIGN_FILE_VERSION, name: records.name,
    ...(records.settings ? { settings: records.settings } : {}),
    stations: [...records.stations], latitudeReadings: [...records.latitudeReadings], arcReadings: [...records.arcReadings],
    exclusions: [...(records.exclusions ?? [])],
  };
}
