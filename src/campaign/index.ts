// The campaign domain: records and their schema, validation, reductions, solveCampaign, the demo.
export * from './records.ts';
export type * from './result.ts';
export { ENGINE_VERSION } from './engine-version.ts';
export { validateCampaign, checkCampaignFile, checkCampaignRecords, crossRecordProblems, formatFieldPath, type CampaignCheck } from './validate-campaign.ts';
export { campaignJsonSchema, campaignJsonSchemaText, CAMPAIGN_SCHEMA_ID } from './campaign-json-schema.ts';
export { reduceStationLatitudes, HUBER_LOCATION_K, type StationLatitude, type LatitudeEstimate, type LatitudeReadingFit, type StationLatitudeOptions } from './station-latitudes.ts';
export { reduceArcToEllipsoid, arcMeanHeight, type ArcHeightSource } from './reduce-arc.ts';
export { degreeRow, degreeRows, type ArcGeometry, type DegreeRow } from './degree-rows.ts';
export { formatSigma } from './format-sigma.ts';
