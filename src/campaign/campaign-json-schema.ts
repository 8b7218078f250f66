// The published JSON Schema of the campaign file (public/schema/campaign-v1.json), derived from the
// one zod schema so the two cannot drift: scripts/gen-campaign-schema.ts writes it, and
// test/campaign/campaign-json-schema.test.ts fails when the committed file differs from this output.
// Cross-record rules (unique ids, stations that exist, an arc's two different stations) are not
// expressible in JSON Schema; they are stated in the description and checked by validateCampaign.
import { z } from 'zod';
import { CAMPAIGN_FILE_VERSION, CampaignFileSchema } from './records.ts';

export const CAMPAIGN_SCHEMA_ID = `https://arcfield.invalid/schema/campaign-v${CAMPAIGN_FILE_VERSION}.json`;

export function campaignJsonSchema(): Record<string, unknown> {
  const generated = z.toJSONSchema(CampaignFileSchema, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
  const { $schema, ...rest } = generated;
  return {
    $schema,
    $id: CAMPAIGN_SCHEMA_ID,
    title: `arcfield campaign file, version ${CAMPAIGN_FILE_VERSION}`,
    description:
      'Stations, repeat latitude readings and meridian arc readings of one campaign. Units are in the field ' +
      'names (Deg = decimal degrees, north and east positive; M = metres; Arcsec = arcseconds). Beyond this ' +
      'schema, a valid file has unique station codes, unique ids across all readings and exclusions, every ' +
      'station reference naming a listed station, arcs between two different stations, and exclusions ' +
      'naming an existing reading.',
    ...rest,
  };
}

/** The schema as committed: two-space indented JSON with a final newline. */
export function campaignJsonSchemaText(): string {
  return JSON.stringify(campaignJsonSchema(), null, 2) + '\n';
}
