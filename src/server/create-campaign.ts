// Bootstrap: a new campaign and its first lead token (`arcfield serve --create-campaign NAME`).
// The token is returned once; only its hash is stored.
import { v7 as uuidv7 } from 'uuid';
import { InputError } from '../errors.ts';
import type { SyncStorage } from './storage.ts';
import { newToken } from './tokens.ts';

export interface CreatedCampaign {
  campaignId: string;
  name: string;
  leadToken: string;
  tokenId: string;
}

export async function createCampaign(storage: SyncStorage, name: string, opts: { now?: Date; label?: string; campaignId?: string } = {}): Promise<CreatedCampaign> {
  const trimmed = name.trim();
  if (trimmed.length === 0 || trimmed.length > 200) throw new InputError('--create-campaign', name, 'a campaign name of 1 to 200 characters');
  const now = opts.now ?? new Date();
  const campaignId = opts.campaignId ?? uuidv7();
  if (!/^[A-Za-z0-9._:-]{1,128}$/.test(campaignId)) throw new InputError('campaignId', campaignId, 'letters, digits and . _ : - only, at most 128');
  const made = newToken(campaignId, 'lead', opts.label ?? 'first lead', null, now);
  await storage.createCampaign({ id: campaignId, name: trimmed, createdAt: now.toISOString() }, made.row);
  return { campaignId, name: trimmed, leadToken: made.token, tokenId: made.row.id };
}
