// The schemas every record passes on its way into the store, gathered in one module that the
// store loads on its first write (load-record-checks.ts), so zod and the schemas are not part of
// the app's first screen. Nothing here is new validation: these are the campaign's own schemas.
export {
  ArcReadingSchema, CampaignFileSchema, ExclusionSchema, LatitudeReadingSchema, StationSchema,
} from '../campaign/records.ts';
export { CampaignRecordSchema } from './campaign-record.ts';
export { validateRecord } from './validate-record.ts';
