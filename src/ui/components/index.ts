// Shared pieces of the screens.
export { LiveFitStrip } from './live-fit-strip.tsx';
export { FieldCautions } from './field-cautions.tsx';
export { StoragePanel } from './storage-panel.tsx';
export { UpdatePrompt } from './update-prompt.tsx';
export { FitChart } from './fit-chart.tsx';
export { SaveStatus, useSaveState, type SaveState } from './save-status.tsx';
export { useAlert } from './use-alert.ts';
