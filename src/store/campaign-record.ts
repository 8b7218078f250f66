// The campaign itself as a synced record (kind "campaign"). records.ts defines the per-reading
// records; a campaign on a device is its name, description and solve settings.
import { z } from 'zod';
import { CampaignSettingsSchema } from '../campaign/records.ts';

export const CampaignRecordSchema = z.strictObject({
  id: z.string().min(1).max(128).regex(/^[A-Za-z0-9._:-]+$/, 'letters, digits and . _ : - only'),
  name: z.string().trim().min(1, 'a campaign needs a name').max(200, 'at most 200 characters'),
  description: z.string().max(4000, 'at most 4000 characters').optional(),
  settings: CampaignSettingsSchema.optional(),
  createdAt: z.iso.datetime({ offset: true, message: 'an ISO 8601 date-time with Z or an offset' }),
});
export type CampaignRecord = z.infer<typeof CampaignRecordSchema>;
