// GNSS capture for geodetic latitude readings: the watch, its error messages, and the averaging.
export * from './average-fixes.ts';
export * from './location-error.ts';
export * from './location-watch.ts';
