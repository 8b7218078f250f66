// Campaign decisions in the app: the printable report and CSV import with column mapping.
export { ReportAction, type ReportActionProps } from './report-action.tsx';
export { CsvImportPanel, type CsvImportPanelProps, type CsvImportRequest, type CsvImportCounts } from './csv-import-panel.tsx';
export { campaignFileOf } from './campaign-file-of.ts';
export type { ReportRequest, ReportReply } from './report-protocol.ts';
