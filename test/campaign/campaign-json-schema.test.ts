// The published JSON Schema (public/schema/campaign-v1.json) must be exactly what the zod schema
// generates (scripts/gen-campaign-schema.ts); regenerate with `npx tsx scripts/gen-campaign-schema.ts`.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { campaignJsonSchemaText } from '../../src/campaign/index.ts';

describe('campaign JSON Schema', () => {
  it('committed file equals the generated schema', () => {
    const committed = readFileSync(new URL('../../public/schema/campaign-v1.json', import.meta.url), 'utf8');
    expect(committed).toBe(campaignJsonSchemaText());
  });

  it('states the fields of the issue-2 shape with their types and ranges', () => {
    const s = JSON.parse(campaignJsonSchemaText()) as {
      required: string[];
      properties: Record<string, { items?: { properties: Record<string, { type?: string; minimum?: number; maximum?: number; exclusiveMinimum?: number }>; required: string[] } }>;
    };
    expect(s.required).toEqual(expect.arrayContaining(['format', 'version', 'name', 'stations', 'latitudeReadings', 'arcReadings']));
    const lat = s.properties.latitudeReadings.items;
    expect(lat?.properties.latitudeDeg).toMatchObject({ type: 'number', minimum: -90, maximum: 90 });
    expect(lat?.properties.sigmaArcsec).toMatchObject({ type: 'number', exclusiveMinimum: 0 });
    expect(s.properties.arcReadings.items?.required).toEqual(expect.arrayContaining(['id', 'fromStation', 'toStation', 'distanceM', 'sigmaM']));
  });
});
