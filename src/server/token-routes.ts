// A lead issues, lists and revokes the crew tokens of their campaign. The secret is returned once.
import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { IssueTokenRequestSchema, type IssuedToken, type TokenInfo } from '../sync/wire.ts';
import { requireCampaign, requireRole } from './auth.ts';
import { HttpError } from './http-error.ts';
import { parseRequest } from './parse-request.ts';
import type { ServerContext } from './server-context.ts';
import type { TokenRow } from './storage.ts';
import { newToken } from './tokens.ts';

const CampaignParams = z.strictObject({ campaignId: z.string().min(1).max(128) });
const TokenParams = z.strictObject({ campaignId: z.string().min(1).max(128), tokenId: z.string().min(1).max(128) });

function infoOf(t: TokenRow): TokenInfo {
  return { tokenId: t.id, role: t.role, label: t.label, deviceId: t.deviceId, campaignId: t.campaignId, createdAt: t.createdAt, revokedAt: t.revokedAt };
}


export function registerTokenRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.post('/api/campaigns/:campaignId/tokens', async (req, reply): Promise<IssuedToken> => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireRole(token, ['lead'], 'issue tokens');
    const body = parseRequest(IssueTokenRequestSchema, req.body, 'body');
    const made = newToken(campaignId, body.role, body.label, body.deviceId ?? null, new Date(ctx.now()));
    try {
      await ctx.storage.insertToken(made.row);
    } catch (err) {
      const code = (err as { code?: unknown }).code;
      if (code === 'SQLITE_CONSTRAINT_UNIQUE' || code === '23505') throw new HttpError(409, 'device-taken', 'a live token is already bound to this device id', 'body.deviceId');
      throw err;
    }
    void reply.code(201).header('cache-control', 'no-store');
    const r = made.row;
    return { tokenId: r.id, token: made.token, role: r.role, label: r.label, deviceId: r.deviceId, campaignId: r.campaignId };
  });

  app.get('/api/campaigns/:campaignId/tokens', async (req) => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireRole(token, ['lead'], 'list tokens');
    return { tokens: (await ctx.storage.listTokens(campaignId)).map(infoOf) };
  });

  app.delete('/api/campaigns/:campaignId/tokens/:tokenId', async (req) => {
    const { campaignId, tokenId } = parseRequest(TokenParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireRole(token, ['lead'], 'revoke tokens');
    if (!(await ctx.storage.revokeToken(campaignId, tokenId, new Date(ctx.now()).toISOString()))) {
      throw new HttpError(404, 'no-such-token', 'no live token with this id in this campaign', 'path.tokenId');
    }
    return { revoked: tokenId };
  });
}
