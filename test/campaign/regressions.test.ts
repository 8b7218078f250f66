// Regression tests, named after the defect; inputs pinned in test/fixtures/campaign/regressions/.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { solveCampaign, validateCampaign } from '../../src/campaign/index.ts';
import { within } from '../helpers/within.ts';

const pinned = (name: string): unknown => JSON.parse(readFileSync(new URL(`../fixtures/campaign/regressions/${name}`, import.meta.url), 'utf8'));

describe('regressions', () => {
  it('tukey-flat-profile-picked-bracket-edge: Tukey on the demo stays near WGS 84', () => {
    const file = validateCampaign(pinned('tukey-flat-profile-picked-bracket-edge.json'));
    const r = solveCampaign(file, { model: 'ellipsoid', estimator: 'tukey' });
    expect(r.status).toBe('ok');
    // WGS 84 1/f = 298.257 223 563 (NIMA TR8350.2 — from memory); the campaign's σ(1/f) is ≈ 0.2–0.6.
    within(r.figure?.inverseFlattening ?? 0, 298.257223563, 1, '', 'Tukey 1/f', { source: 'NIMA TR8350.2 (from memory)' });
    expect(r.reason).not.toMatch(/edge of the search bracket/);
  });
});
