// Crew tokens. A token is 32 random bytes (256 bits) from the OS CSPRNG, shown once and stored only
// as its SHA-256. A fast hash is enough here: slow password hashes (scrypt, Argon2) exist to make
// guessing a LOW-entropy secret expensive, but guessing one of 2^256 equally likely tokens is
// infeasible at any hashing speed, and a fast hash keeps every request cheap. Lookup is by the hash
// itself (unique index), so no secret is ever compared byte by byte in application code.
import { createHash, randomBytes } from 'node:crypto';
import { v7 as uuidv7 } from 'uuid';
import type { CrewRole } from '../sync/protocol.ts';
import type { TokenRow } from './storage.ts';

/** Prefix that makes a leaked token easy to recognise in logs and secret scanners. */
export const TOKEN_PREFIX = 'arcf_';
const TOKEN_BYTES = 32;

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export interface NewToken {
  /** The secret: give it to the person once; it cannot be shown again. */
  token: string;
  row: TokenRow;
}

export function newToken(campaignId: string, role: CrewRole, label: string, deviceId: string | null, now: Date): NewToken {
  const token = TOKEN_PREFIX + randomBytes(TOKEN_BYTES).toString('base64url');
  return {
    token,
    row: { id: uuidv7(), campaignId, tokenHash: hashToken(token), role, label, deviceId, createdAt: now.toISOString(), revokedAt: null },
  };
}

/** The bearer token of an Authorization header, or null. */
export function bearerOf(header: string | undefined): string | null {
  if (!header) return null;
  const m = /^Bearer ([A-Za-z0-9_-]{1,200})$/.exec(header);
  return m ? m[1] : null;
}
