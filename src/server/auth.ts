// Who is calling, and may they touch this campaign? Every route except health needs a live crew
// token of the campaign named in its path; a token bound to a device speaks only for that device.
import type { FastifyRequest } from 'fastify';
import type { CrewRole } from '../sync/protocol.ts';
import { HttpError } from './http-error.ts';
import type { SyncStorage, TokenRow } from './storage.ts';
import { bearerOf, hashToken } from './tokens.ts';
import type { TokenBuckets } from './token-bucket.ts';

export interface AuthLimits {
  /** Per token: every authenticated request takes one. */
  perToken: TokenBuckets;
  /** Per client address: every failed authentication takes one (slows token guessing). */
  failures: TokenBuckets;
}

function retryError(waitMs: number, what: string): HttpError {
  return new HttpError(429, 'rate-limited', `too many ${what}; retry after ${Math.ceil(waitMs / 1000)} s`, undefined, Math.max(1, Math.ceil(waitMs / 1000)));
}

export async function authenticate(req: FastifyRequest, storage: SyncStorage, limits: AuthLimits): Promise<TokenRow> {
  const secret = bearerOf(req.headers.authorization);
  const token = secret ? await storage.findTokenByHash(hashToken(secret)) : null;
  if (!token || token.revokedAt !== null) {
    const wait = limits.failures.take(req.ip);
    if (wait > 0) throw retryError(wait, 'failed authentications from this address');
    throw new HttpError(401, secret ? 'unknown-token' : 'no-token',
      secret ? 'this token is unknown or revoked' : 'send Authorization: Bearer <crew token>');
  }
  const wait = limits.perToken.take(token.id);
  if (wait > 0) throw retryError(wait, 'requests for this token');
  return token;
}

/** The token must belong to the campaign in the path (same answer whether or not that campaign exists). */
export function requireCampaign(token: TokenRow, campaignId: string): void {
  if (token.campaignId !== campaignId) throw new HttpError(403, 'wrong-campaign', 'this token belongs to another campaign');
}

export function requireRole(token: TokenRow, allowed: readonly CrewRole[], action: string): void {
  if (!allowed.includes(token.role)) throw new HttpError(403, 'wrong-role', `a ${token.role} token may not ${action}`);
}

/** A device header, when sent, must match the device the token is bound to. */
export function requireDevice(token: TokenRow, deviceId: string | undefined): void {
  if (deviceId !== undefined && token.deviceId !== null && token.deviceId !== deviceId) {
    throw new HttpError(403, 'device-mismatch', 'this token is bound to another device');
  }
}
