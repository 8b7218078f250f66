// src/io: CSV, GeoJSON and the printable report — plain text in, plain text out, so the same code
// runs in the app (browser), the worker and the CLI. Browser-safe on purpose: the Node-only file
// helpers (campaign-file.ts, write-file-atomic.ts) are imported directly by the CLI, not from here.
export { writeCsv, formatNumberCell, CRLF, type CsvCell } from './csv-writer.ts';
export { readCsv, type CsvRecord, type CsvTable } from './csv-reader.ts';
export { guardFormula, unguardFormula } from './formula-guard.ts';
export { toUtcInstant } from './utc-instant.ts';
export { RECORD_TABLES, RECORD_TABLE_IDS, isRecordTableId, tableRecords, type RecordTable, type RecordTableId, type RecordColumn, type ColumnType } from './record-tables.ts';
export { recordTableCsv } from './record-csv.ts';
export { importCsvTable, matchColumns, type CsvImportOptions, type CsvImportResult, type ColumnMatch, type ImportMode } from './csv-import.ts';
export { stationsGeoJson, stationsGeoJsonText, GEOJSON_DECIMALS, type StationCollection, type StationFeature, type StationProperties } from './stations-geojson.ts';
export { RESULT_TABLE_IDS, isResultTableId, resultTableCsv, type ResultTableId } from './result-tables.ts';
export { buildReportData, REPORT_BOOTSTRAP_REPLICATES, type ReportData, type ReportOptions } from './report-data.ts';
export { campaignReportHtml } from './report-html.ts';
export { degreeLengthChart, arcResidualChart, latitudeRepeatsChart } from './report-charts.ts';
export { FIELD_CAUTIONS, LEGAL_NOTICE } from './report-notices.ts';
export { escapeHtml } from './html-escape.ts';
