// Schema version 2 (adds to v1, which stays frozen in schema-v1.ts):
//  - latitude and arc readings gain `observedMs` (epoch ms of `record.observedAt`, UTC) and an index
//    [campaignId+deleted+observedMs], so the long reading list pages in observation order even for
//    imported readings whose ids are not time-ordered UUIDv7;
//  - a `conflicts` table keeps the losing side of a concurrent edit for a person to resolve
//    (design.md "Sync semantics": a losing edit is kept, never dropped).
// The upgrade walks every reading row once and is idempotent (it only sets a derived field).
import type { Transaction } from 'dexie';

export const SCHEMA_V2 = {
  latitudeReadings: 'id, [campaignId+station+deleted], [campaignId+deleted+id], [campaignId+deleted+observedMs]',
  arcReadings: 'id, [campaignId+fromStation], [campaignId+toStation], [campaignId+deleted+id], [campaignId+deleted+observedMs]',
  conflicts: 'conflictId, [campaignId+status], [recordKind+recordId]',
} as const;

export const SCHEMA_V2_VERSION = 2;

/** Epoch ms of an ISO instant, or 0 when absent or unparsable (sorts first; never NaN in an index). */
export function observedMsOf(observedAt: unknown): number {
  if (typeof observedAt !== 'string') return 0;
  const ms = Date.parse(observedAt);
  return Number.isFinite(ms) ? ms : 0;
}

interface RowWithObservation {
  observedMs?: number;
  record: { observedAt?: string } | null;
}

/** v1 → v2: derive `observedMs` on every latitude and arc reading, row by row. */
export async function upgradeToV2(tx: Transaction): Promise<void> {
  for (const table of ['latitudeReadings', 'arcReadings']) {
    await tx.table<RowWithObservation>(table).toCollection().modify((row) => {
      row.observedMs = observedMsOf(row.record?.observedAt);
    });
  }
}
