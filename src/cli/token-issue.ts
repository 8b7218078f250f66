// `arcfield serve --issue-token`: a token made on the server machine itself (whoever can open the
// database is trusted), for a lead who lost theirs or a first crew token before any lead device.
import { InputError } from '../errors.ts';
import type { SyncStorage } from '../server/storage.ts';
import { newToken } from '../server/tokens.ts';
import { CREW_ROLES, type CrewRole } from '../sync/protocol.ts';
import type { IssuedToken } from '../sync/wire.ts';

export interface OfflineTokenRequest {
  campaignId?: string;
  role?: string;
  label?: string;
  deviceId?: string;
}

export async function issueTokenOffline(storage: SyncStorage, req: OfflineTokenRequest): Promise<IssuedToken> {
  if (!req.campaignId) throw new InputError('--campaign', req.campaignId, 'give the campaign id (printed by --create-campaign)');
  if (!req.role || !(CREW_ROLES as readonly string[]).includes(req.role)) throw new InputError('--role', req.role, `one of ${CREW_ROLES.join(', ')}`);
  const label = req.label?.trim() ?? '';
  if (label.length === 0 || label.length > 200) throw new InputError('--label', req.label, 'say who the token is for (1 to 200 characters)');
  if (req.deviceId !== undefined && !/^[A-Za-z0-9._:-]{1,128}$/.test(req.deviceId)) throw new InputError('--device', req.deviceId, 'letters, digits and . _ : - only, at most 128');
  if (!(await storage.findCampaign(req.campaignId))) throw new InputError('--campaign', req.campaignId, 'no such campaign in this database');
  const made = newToken(req.campaignId, req.role as CrewRole, label, req.deviceId ?? null, new Date());
  await storage.insertToken(made.row);
  return { tokenId: made.row.id, token: made.token, role: made.row.role, label, deviceId: made.row.deviceId, campaignId: req.campaignId };
}
