// Every pushed change passes the same record schema the app uses (src/campaign/records.ts), once,
// before the push transaction opens; a bad change is refused on its own with the field and reason,
// and nothing of it is stored. JSON cannot carry NaN, but `1e999` parses to Infinity — the schemas'
// `.finite()` refuses it like any other non-finite number.
import { createHash } from 'node:crypto';
import type { ZodType } from 'zod';
import { RECORD_SCHEMAS, type RecordKind } from '../campaign/records.ts';
import { type Change, type CrewRole } from '../sync/protocol.ts';
import { ChangeSchema, type PushResult } from '../sync/wire.ts';

export type Rejection = Extract<PushResult, { status: 'rejected' }>;
export type Checked = { ok: true; change: Change; contentHash: string } | { ok: false; rejection: Rejection };

/** Which record kinds each role may write (viewers may not push at all — refused before this). */
const WRITABLE: Record<CrewRole, ReadonlySet<RecordKind>> = {
  observer: new Set(['station', 'latitudeReading', 'arcReading']),
  lead: new Set(['campaign', 'station', 'latitudeReading', 'arcReading', 'exclusion']),
  viewer: new Set(),
};

/** Schema of each record kind the server accepts; the caller may add kinds (serve adds `campaign`). */
export type RecordSchemas = Partial<Record<RecordKind, ZodType>>;
export const DEFAULT_RECORD_SCHEMAS: RecordSchemas = RECORD_SCHEMAS;

const pathOf = (path: readonly PropertyKey[]) => path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('');

/** Key-sorted JSON, so the content hash does not depend on key order. */
export function canonicalJson(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonicalJson).join(',')}]`;
  if (v !== null && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o).filter((k) => o[k] !== undefined).sort().map((k) => `${JSON.stringify(k)}:${canonicalJson(o[k])}`).join(',')}}`;
  }
  return JSON.stringify(v);
}

export function checkChange(raw: unknown, index: number, role: CrewRole, schemas: RecordSchemas = DEFAULT_RECORD_SCHEMAS): Checked {
  const label = `changes[${index}]`;
  const idOf = (): string => {
    const id = (raw as { changeId?: unknown } | null)?.changeId;
    return typeof id === 'string' && id.length > 0 && id.length <= 128 ? id : `#${index}`;
  };
  const reject = (field: string, reason: string): Checked => ({ ok: false, rejection: { status: 'rejected', changeId: idOf(), field, reason } });

  const env = ChangeSchema.safeParse(raw);
  if (!env.success) {
    const issue = env.error.issues[0];
    return reject(`${label}${pathOf(issue.path)}`, issue.message);
  }
  const change: Change = env.data;
  if (!WRITABLE[role].has(change.recordKind)) return reject(`${label}.recordKind`, `a ${role} token may not write ${change.recordKind} records`);
  if (change.resolves && role !== 'lead') return reject(`${label}.resolves`, 'only a lead may resolve conflicts');
  if (change.recordKind === 'campaign' && change.recordId !== change.campaignId) return reject(`${label}.recordId`, 'the campaign record has the campaign id');

  if (change.op === 'delete') {
    if (change.record !== null) return reject(`${label}.record`, 'a delete carries no record (null)');
  } else {
    const schema = schemas[change.recordKind];
    if (!schema) return reject(`${label}.recordKind`, `this server has no schema for ${change.recordKind} records`);
    if (change.record === null || typeof change.record !== 'object' || Array.isArray(change.record)) {
      return reject(`${label}.record`, 'a put carries the whole record as an object');
    }
    const parsed = schema.safeParse(change.record);
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      return reject(`${label}.record${pathOf(issue.path)}`, issue.message);
    }
    const recId = (parsed.data as { id?: unknown }).id;
    if (recId !== undefined && recId !== change.recordId) return reject(`${label}.record.id`, `must equal recordId ${JSON.stringify(change.recordId)}`);
    change.record = parsed.data;
  }
  const contentHash = createHash('sha256').update(canonicalJson(change)).digest('hex');
  return { ok: true, change, contentHash };
}
