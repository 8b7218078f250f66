// Record types of a campaign and the one validation schema every record passes, whether it comes
// from a person (the app), a file (the CLI, imports) or the network (the sync server).
// Units live in field names: Deg = decimal degrees, M = metres, Arcsec = arcseconds.
// Latitude is north-positive, in [-90, 90]; longitude east-positive, in [-180, 180].
import { z } from 'zod';
// The value lists live in record-enums.ts (no zod), so screens can offer them without loading the schemas.
import { ESTIMATOR_IDS, LATITUDE_KINDS, LENGTH_UNIT_IDS, MODEL_IDS, WEIGHTING_IDS } from './record-enums.ts';

export {
  ESTIMATOR_IDS, LATITUDE_KINDS, LENGTH_UNIT_IDS, MODEL_IDS, RECORD_KINDS, WEIGHTING_IDS,
  type EstimatorId, type LatitudeKind, type LengthUnitId, type ModelId, type RecordKind, type WeightingId,
} from './record-enums.ts';

const id = z.string().min(1, 'must not be empty').max(128, 'at most 128 characters')
  .regex(/^[A-Za-z0-9._:-]+$/, 'letters, digits and . _ : - only');
const stationCode = z.string().min(1, 'must not be empty').max(32, 'at most 32 characters')
  .regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, _ and - only');
const isoInstant = z.iso.datetime({ offset: true, message: 'an ISO 8601 date-time with Z or an offset' });
const freeText = (max: number) => z.string().max(max, `at most ${max} characters`);
const positive = (what: string) => z.number().finite().positive(`${what} must be greater than 0`);

export const StationSchema = z.strictObject({
  id: id.optional(),
  code: stationCode,
  name: freeText(200).optional(),
  heightM: z.number().finite().min(-500, 'below -500 m').max(9000, 'above 9000 m').optional(),
  longitudeDeg: z.number().finite().min(-180, 'below -180°').max(180, 'above 180°').optional(),
  notes: freeText(4000).optional(),
});
export type Station = z.infer<typeof StationSchema>;

/** A GNSS fix kept for audit beside an averaged geodetic reading. */
export const GnssFixSchema = z.strictObject({
  latitudeDeg: z.number().finite().min(-90).max(90),
  longitudeDeg: z.number().finite().min(-180).max(180),
  accuracyM: z.number().finite().nonnegative(),
  altitudeM: z.number().finite().nullable().optional(),
  fixTime: isoInstant,
});
export type GnssFix = z.infer<typeof GnssFixSchema>;

export const LatitudeReadingSchema = z.strictObject({
  id,
  station: stationCode,
  kind: z.enum(LATITUDE_KINDS, { message: 'astronomic or geodetic' }),
  latitudeDeg: z.number().finite().min(-90, 'below -90°').max(90, 'above 90°'),
  sigmaArcsec: positive('sigma'),
  observedAt: isoInstant,
  method: freeText(500).optional(),
  /** As typed, for the audit trail (e.g. `41°12'33.25"N`). */
  enteredText: freeText(100).optional(),
  observer: freeText(200).optional(),
  gnssFixes: z.array(GnssFixSchema).max(1000).optional(),
});
export type LatitudeReading = z.infer<typeof LatitudeReadingSchema>;

export const ArcReadingSchema = z.strictObject({
  id,
  fromStation: stationCode,
  toStation: stationCode,
  distanceM: positive('distance'),
  sigmaM: positive('sigma'),
  /** The distance as entered, with its unit; `distanceM` is the canonical value. */
  enteredDistance: z.strictObject({ value: positive('distance'), unit: z.enum(LENGTH_UNIT_IDS) }).optional(),
  /** Mean height of the measured line above the ellipsoid, for the reduction to the ellipsoid. */
  meanHeightM: z.number().finite().min(-500).max(9000).optional(),
  observedAt: isoInstant.optional(),
  method: freeText(500).optional(),
}).refine((a) => a.fromStation !== a.toStation, { message: 'an arc needs two different stations', path: ['toStation'] });
export type ArcReading = z.infer<typeof ArcReadingSchema>;

/** A person's decision to leave one reading out of the fit. Undo = delete the exclusion. */
export const ExclusionSchema = z.strictObject({
  id,
  readingId: id,
  excludedBy: freeText(200).min(1, 'say who excluded it'),
  reason: freeText(1000).min(1, 'say why'),
  at: isoInstant,
});
export type Exclusion = z.infer<typeof ExclusionSchema>;

export const CampaignSettingsSchema = z.strictObject({
  estimator: z.enum(ESTIMATOR_IDS).optional(),
  model: z.enum(MODEL_IDS).optional(),
  weighting: z.enum(WEIGHTING_IDS).optional(),
  suspectThreshold: z.number().finite().min(1).max(20).optional(),
  referenceEllipsoid: z.string().max(40).optional(),
  /** Which latitude kind feeds the arcs (default astronomic: astro-geodetic arcs use astronomic latitudes). */
  latitudeKind: z.enum(LATITUDE_KINDS, { message: 'astronomic or geodetic' }).optional(),
});
export type CampaignSettings = z.infer<typeof CampaignSettingsSchema>;

export const CAMPAIGN_FILE_FORMAT = 'arcfield-campaign';
export const CAMPAIGN_FILE_VERSION = 1;

/** The campaign file, version 1 (its JSON Schema is published as public/schema/campaign-v1.json). */
export const CampaignFileSchema = z.strictObject({
  format: z.literal(CAMPAIGN_FILE_FORMAT),
  version: z.literal(CAMPAIGN_FILE_VERSION),
  id: id.optional(),
  name: freeText(200).min(1, 'a campaign needs a name'),
  description: freeText(4000).optional(),
  settings: CampaignSettingsSchema.optional(),
  stations: z.array(StationSchema),
  latitudeReadings: z.array(LatitudeReadingSchema),
  arcReadings: z.array(ArcReadingSchema),
  exclusions: z.array(ExclusionSchema).optional(),
});
export type CampaignFile = z.infer<typeof CampaignFileSchema>;

/** The records `solveCampaign` needs, whatever they were loaded from. */
export interface CampaignRecords {
  name: string;
  settings?: CampaignSettings;
  stations: readonly Station[];
  latitudeReadings: readonly LatitudeReading[];
  arcReadings: readonly ArcReading[];
  exclusions?: readonly Exclusion[];
}

export const RECORD_SCHEMAS = {
  station: StationSchema,
  latitudeReading: LatitudeReadingSchema,
  arcReading: ArcReadingSchema,
  exclusion: ExclusionSchema,
} as const;
