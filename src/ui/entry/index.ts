// Entry-field logic (pure): angle and number parsing as typed, local time fields.
export * from './angle-entry.ts';
export * from './local-time.ts';
