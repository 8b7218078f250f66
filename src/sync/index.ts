// Public surface of the sync layer: wire protocol, clock, merge rules, conflicts, the store port.
export * from './protocol.ts';
export * from './hlc.ts';
export * from './merge.ts';
export * from './conflict.ts';
export * from './resolution.ts';
export * from './wire.ts';
export type * from './sync-store.ts';
