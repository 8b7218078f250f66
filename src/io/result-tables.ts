// The CSV tables of a fit (export only; they are recomputed from the records, never imported):
// the figure, the coefficients, the station summary and the per-reading residuals. Units are in
// the column names; where a column's unit depends on the row (a residual is metres per degree for
// an arc in the degree models, metres in the ellipsoid model, arcseconds for a latitude reading),
// the row carries it in a `…_unit` column instead.
import type { CampaignResult } from '../campaign/result.ts';
import { writeCsv, type CsvCell } from './csv-writer.ts';

export const RESULT_TABLE_IDS = ['figure', 'coefficients', 'station-summary', 'residuals'] as const;
export type ResultTableId = (typeof RESULT_TABLE_IDS)[number];

export function isResultTableId(value: string): value is ResultTableId {
  return (RESULT_TABLE_IDS as readonly string[]).includes(value);
}

const num = (value: number | null | undefined): CsvCell =>
  value === null || value === undefined || !Number.isFinite(value) ? null : { kind: 'number', value };
const code = (value: string): CsvCell => ({ kind: 'code', value });
const text = (value: string): CsvCell => (value === '' ? null : { kind: 'text', value });
const bool = (value: boolean): CsvCell => ({ kind: 'boolean', value });

/** One result table as CSV text. */
export function resultTableCsv(result: CampaignResult, table: ResultTableId): string {
  switch (table) {
    case 'figure': {
      const f = result.figure;
      return writeCsv(
        ['model', 'estimator', 'weighting', 'status', 'semi_major_axis_m', 'semi_major_axis_std_m', 'inverse_flattening', 'inverse_flattening_std',
          'flattening', 'eccentricity_squared', 'quadrant_m', 'quadrant_std_m', 'inversion', 'converged', 'iterations', 'engine_version'],
        [[code(result.model), code(result.estimator), code(result.weighting), code(result.status),
          num(f?.semiMajorAxisM), num(f?.semiMajorAxisStdM), num(f?.inverseFlattening), num(f?.inverseFlatteningStd),
          num(f?.flattening), num(f?.eccentricitySquared), num(f?.quadrantM), num(f?.quadrantStdM), text(f?.inversion ?? ''),
          bool(result.converged), num(result.iterations), code(result.engineVersion)]]);
    }
    case 'coefficients':
      return writeCsv(['name', 'value', 'standard_error', 'unit'],
        result.coefficients.map((c) => [code(c.name), num(c.value), num(c.standardError), text(c.unit)]));
    case 'station-summary':
      return writeCsv(
        ['code', 'latitude_kind', 'latitude_deg', 'sigma_arcsec', 'reading_count', 'spread_arcsec', 'deflection_north_arcsec', 'suspect_reading_ids'],
        result.stations.map((s) => [code(s.code), code(s.kind), num(s.latitudeDeg), num(s.sigmaArcsec), num(s.readingCount),
          num(s.spreadArcsec), num(s.deflectionNorthArcsec), s.suspectReadingIds.length > 0 ? code(s.suspectReadingIds.join(' ')) : null]));
    case 'residuals':
      return writeCsv(
        ['id', 'reading_kind', 'residual', 'residual_unit', 'standardized_residual', 'suspect', 'excluded', 'redundancy', 'w_test', 'minimal_detectable_bias', 'hint'],
        result.readings.map((r) => [code(r.id), code(r.kind), num(r.residual), text(r.residualUnit), num(r.standardizedResidual), bool(r.suspect), bool(r.excluded),
          num(r.redundancy), num(r.wTest), num(r.minimalDetectableBias), text(r.hint)]));
  }
}
