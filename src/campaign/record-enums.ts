// The value lists of the campaign records (units, latitude kinds, record kinds, estimators,
// models, weightings). records.ts builds its schemas on them and re-exports them; they live apart,
// with no zod, so a screen can offer the choices without loading the schemas.
export const LENGTH_UNIT_IDS = ['m', 'km', 'ft', 'us-ft', 'toise'] as const;
export type LengthUnitId = (typeof LENGTH_UNIT_IDS)[number];

export const LATITUDE_KINDS = ['astronomic', 'geodetic'] as const;
export type LatitudeKind = (typeof LATITUDE_KINDS)[number];

/** Record kinds as they appear in the store, the change log and the wire protocol. */
export const RECORD_KINDS = ['campaign', 'station', 'latitudeReading', 'arcReading', 'exclusion'] as const;
export type RecordKind = (typeof RECORD_KINDS)[number];

export const ESTIMATOR_IDS = ['least-squares', 'least-absolute', 'minimax', 'huber', 'tukey'] as const;
export type EstimatorId = (typeof ESTIMATOR_IDS)[number];
export const MODEL_IDS = ['degree', 'degree2', 'ellipsoid'] as const;
export type ModelId = (typeof MODEL_IDS)[number];
export const WEIGHTING_IDS = ['propagated', 'equal'] as const;
export type WeightingId = (typeof WEIGHTING_IDS)[number];
