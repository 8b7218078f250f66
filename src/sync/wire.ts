// Wire schemas of the sync HTTP API (validated on both sides: the server checks every request,
// the client every response). The OpenAPI document (src/server/openapi.json) describes the same
// shapes; test/server/openapi.test.ts keeps the two in step.
import { z } from 'zod';
import { RECORD_KINDS } from '../campaign/records.ts';
import { CONFLICT_REASONS, CONFLICT_STATUSES } from './conflict.ts';
import { CREW_ROLES, MAX_PUSH_CHANGES, type Change } from './protocol.ts';

const wireId = z.string().min(1, 'must not be empty').max(128, 'at most 128 characters')
  .regex(/^[A-Za-z0-9._:-]+$/, 'letters, digits and . _ : - only');
const hlc = z.string().regex(/^\d{16}:\d{5}$/, 'an HLC stamp: 16 digits, a colon, 5 digits');
const isoInstant = z.iso.datetime({ offset: true });
const seq = z.number().int().nonnegative();

export const ChangeSchema = z.strictObject({
  changeId: wireId,
  campaignId: wireId,
  recordKind: z.enum(RECORD_KINDS),
  recordId: wireId,
  op: z.enum(['put', 'delete']),
  /** Checked against the record kind's schema separately, so a bad record is a per-change reject. */
  record: z.unknown(),
  hlc,
  deviceId: wireId,
  baseHlc: hlc.nullable(),
  protocolVersion: z.number().int().positive(),
  resolves: z.array(wireId).max(50).optional(),
});
// The schema and the Change interface must describe the same object.
type SameShape<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const changeShapeMatches: SameShape<z.infer<typeof ChangeSchema>, Change> = true;
void changeShapeMatches;

export const PushRequestSchema = z.strictObject({
  protocolVersion: z.number().int().positive(),
  deviceId: wireId,
  changes: z.array(z.unknown()).min(1, 'at least one change').max(MAX_PUSH_CHANGES, `at most ${MAX_PUSH_CHANGES} changes per push`),
});
export type PushRequest = z.infer<typeof PushRequestSchema>;

export const MERGE_OUTCOMES = ['applied', 'ignored', 'conflict', 'tombstoned'] as const;
export type MergeOutcome = (typeof MERGE_OUTCOMES)[number];

export const PushResultSchema = z.discriminatedUnion('status', [
  z.strictObject({
    status: z.literal('acked'),
    changeId: z.string(),
    serverSeq: seq,
    /** What the server's merge did with it (a conflict still counts as acknowledged: it is kept). */
    outcome: z.enum(MERGE_OUTCOMES),
    /** True when this is a replay of a change the server already had (the original outcome is returned). */
    duplicate: z.boolean(),
    flags: z.array(z.enum(['clock-ahead'])),
  }),
  z.strictObject({
    status: z.literal('rejected'),
    /** The change id as sent, or its position ("#3") when the change had no readable id. */
    changeId: z.string(),
    field: z.string(),
    reason: z.string(),
  }),
]);
export type PushResult = z.infer<typeof PushResultSchema>;

export const PushResponseSchema = z.strictObject({
  protocolVersion: z.number().int(),
  results: z.array(PushResultSchema),
  serverTime: isoInstant,
});
export type PushResponse = z.infer<typeof PushResponseSchema>;

export const PulledChangeSchema = ChangeSchema.extend({
  serverSeq: seq,
  receivedAt: isoInstant,
  clockSkewFlag: z.boolean().optional(),
});

export const ConflictRecordSchema = z.strictObject({
  conflictId: wireId,
  campaignId: wireId,
  recordKind: z.enum(RECORD_KINDS),
  recordId: wireId,
  reason: z.enum(CONFLICT_REASONS),
  loser: ChangeSchema,
  winner: z.strictObject({ changeId: wireId, hlc, deviceId: wireId, deleted: z.boolean() }),
  status: z.enum(CONFLICT_STATUSES),
  resolvedBy: wireId.nullable(),
  serverSeq: seq,
  detectedAt: isoInstant,
  resolvedAt: isoInstant.nullable(),
});

export const PullResponseSchema = z.strictObject({
  protocolVersion: z.number().int(),
  changes: z.array(PulledChangeSchema),
  conflicts: z.array(ConflictRecordSchema),
  /** Cursor to store once these are committed locally (== `after` when the page is empty). */
  nextCursor: seq,
  hasMore: z.boolean(),
  serverTime: isoInstant,
});
export type PullResponse = z.infer<typeof PullResponseSchema>;

export const HealthSchema = z.strictObject({
  status: z.enum(['ok', 'degraded']),
  protocolVersion: z.number().int(),
  minProtocolVersion: z.number().int(),
  /** Oldest app build the server still serves (semver); older apps show "App out of date". */
  minClientVersion: z.string(),
  serverTime: isoInstant,
});
export type Health = z.infer<typeof HealthSchema>;

export const SessionSchema = z.strictObject({
  campaignId: wireId,
  campaignName: z.string(),
  role: z.enum(CREW_ROLES),
  tokenId: wireId,
  /** Device the token is bound to (null until its first push binds it). */
  deviceId: wireId.nullable(),
  protocolVersion: z.number().int(),
  minProtocolVersion: z.number().int(),
  minClientVersion: z.string(),
  serverTime: isoInstant,
});
export type Session = z.infer<typeof SessionSchema>;

export const IssueTokenRequestSchema = z.strictObject({
  role: z.enum(CREW_ROLES),
  label: z.string().min(1, 'say who the token is for').max(200),
  deviceId: wireId.optional(),
});

export const IssuedTokenSchema = z.strictObject({
  tokenId: wireId,
  /** The secret, shown once: the server keeps only its SHA-256. */
  token: z.string(),
  role: z.enum(CREW_ROLES),
  label: z.string(),
  deviceId: wireId.nullable(),
  campaignId: wireId,
});
export type IssuedToken = z.infer<typeof IssuedTokenSchema>;

export const TokenInfoSchema = IssuedTokenSchema.omit({ token: true }).extend({
  createdAt: isoInstant,
  revokedAt: isoInstant.nullable(),
});
export type TokenInfo = z.infer<typeof TokenInfoSchema>;

export const ErrorBodySchema = z.strictObject({
  error: z.string(),
  message: z.string(),
  field: z.string().optional(),
});
export type ErrorBody = z.infer<typeof ErrorBodySchema>;
