// Session, push, pull and conflict routes of one campaign (wire shapes: src/sync/wire.ts).
import type { FastifyInstance, FastifyRequest } from 'fastify';
import { z } from 'zod';
import { DEFAULT_PULL_LIMIT, MAX_PULL_LIMIT, MIN_PROTOCOL_VERSION, PROTOCOL_VERSION } from '../sync/protocol.ts';
import { PushRequestSchema, type PullResponse, type PushResponse, type Session } from '../sync/wire.ts';
import { requireCampaign, requireDevice, requireRole } from './auth.ts';
import { HttpError } from './http-error.ts';
import { parseRequest } from './parse-request.ts';
import { pushBatch } from './push-batch.ts';
import type { ServerContext } from './server-context.ts';

const CampaignParams = z.strictObject({ campaignId: z.string().min(1).max(128) });
const PullQuery = z.strictObject({
  after: z.coerce.number().int('after must be a whole number').nonnegative().max(Number.MAX_SAFE_INTEGER).default(0),
  limit: z.coerce.number().int('limit must be a whole number').min(1).max(MAX_PULL_LIMIT).default(DEFAULT_PULL_LIMIT),
});


function deviceHeader(req: FastifyRequest): string | undefined {
  const h = req.headers['x-arcfield-device'];
  return typeof h === 'string' ? h : undefined;
}

export function registerSyncRoutes(app: FastifyInstance, ctx: ServerContext): void {
  const iso = () => new Date(ctx.now()).toISOString();

  app.get('/api/campaigns/:campaignId/session', async (req): Promise<Session> => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireDevice(token, deviceHeader(req));
    const campaign = await ctx.storage.findCampaign(campaignId);
    if (!campaign) throw new HttpError(403, 'wrong-campaign', 'this token belongs to another campaign');
    return {
      campaignId, campaignName: campaign.name, role: token.role, tokenId: token.id, deviceId: token.deviceId,
      protocolVersion: PROTOCOL_VERSION, minProtocolVersion: MIN_PROTOCOL_VERSION, minClientVersion: ctx.minClientVersion, serverTime: iso(),
    };
  });

  app.post('/api/campaigns/:campaignId/push', async (req): Promise<PushResponse> => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireRole(token, ['observer', 'lead'], 'push changes');
    const body = parseRequest(PushRequestSchema, req.body, 'body');
    if (body.protocolVersion < MIN_PROTOCOL_VERSION) {
      throw new HttpError(426, 'protocol-too-old', `protocol ${body.protocolVersion} is no longer served; update the app (minimum ${MIN_PROTOCOL_VERSION})`);
    }
    if (body.protocolVersion > PROTOCOL_VERSION) {
      throw new HttpError(400, 'protocol-unknown', `this server speaks protocol up to ${PROTOCOL_VERSION}; update the server`, 'body.protocolVersion');
    }
    requireDevice(token, body.deviceId);
    requireDevice(token, deviceHeader(req));
    // Every change must speak for the token's device and campaign; one forged change refuses the batch.
    body.changes.forEach((raw, i) => {
      const c = raw as { deviceId?: unknown; campaignId?: unknown } | null;
      if (c && typeof c.deviceId === 'string' && c.deviceId !== body.deviceId) {
        throw new HttpError(403, 'device-mismatch', `changes[${i}].deviceId is not the pushing device`, `body.changes[${i}].deviceId`);
      }
      if (c && typeof c.campaignId === 'string' && c.campaignId !== campaignId) {
        throw new HttpError(403, 'wrong-campaign', `changes[${i}].campaignId is not this campaign`, `body.changes[${i}].campaignId`);
      }
    });
    if (token.deviceId === null && !(await ctx.storage.bindTokenDevice(token.id, body.deviceId))) {
      throw new HttpError(403, 'device-taken', 'another live token of this campaign is bound to this device id');
    }
    const results = await pushBatch(ctx.storage, { campaignId, role: token.role, now: ctx.now, recordSchemas: ctx.recordSchemas, duringPush: ctx.testHooks?.duringPush }, body.changes);
    return { protocolVersion: PROTOCOL_VERSION, results, serverTime: iso() };
  });

  app.get('/api/campaigns/:campaignId/pull', async (req): Promise<PullResponse> => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    requireDevice(token, deviceHeader(req));
    const q = parseRequest(PullQuery, req.query, 'query');
    const page = await ctx.storage.pull(campaignId, q.after, q.limit);
    return { protocolVersion: PROTOCOL_VERSION, ...page, serverTime: iso() };
  });

  app.get('/api/campaigns/:campaignId/conflicts', async (req) => {
    const { campaignId } = parseRequest(CampaignParams, req.params, 'path');
    const token = await ctx.auth(req);
    requireCampaign(token, campaignId);
    return { conflicts: await ctx.storage.listConflicts(campaignId) };
  });
}
