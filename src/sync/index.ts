// Public surface of the sync layer: wire protocol, clock, merge rules, conflicts, the store port,
// the client loop and its state, the browser wiring, and the in-memory reference store.
export * from './protocol.ts';
export * from './hlc.ts';
export * from './merge.ts';
export * from './conflict.ts';
export * from './resolution.ts';
export * from './wire.ts';
export type * from './sync-store.ts';
export * from './sync-state.ts';
export * from './backoff.ts';
export * from './sync-http.ts';
export * from './sync-client.ts';
export * from './browser-sync.ts';
export * from './memory-sync-store.ts';
export * from './version-compare.ts';
