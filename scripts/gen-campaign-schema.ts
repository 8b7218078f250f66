// Writes public/schema/campaign-v1.json from the zod schema (src/campaign/campaign-json-schema.ts).
// Run: npx tsx scripts/gen-campaign-schema.ts   (the test in test/campaign checks the file is current)
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { campaignJsonSchemaText } from '../src/campaign/campaign-json-schema.ts';

const target = fileURLToPath(new URL('../public/schema/campaign-v1.json', import.meta.url));
writeFileSync(target, campaignJsonSchemaText());
process.stdout.write(`wrote ${target}\n`);
