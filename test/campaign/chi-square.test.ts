// χ² upper tail and ln Γ against scipy (fixture from scripts/gen-campaign-chi-square-fixture.py).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { chiSquareUpperTail, logGamma } from '../../src/campaign/chi-square.ts';
import { within } from '../helpers/within.ts';

interface Fixture { source: string; chiSquareSf: { x: number; dof: number; sf: number }[]; logGamma: { x: number; lgamma: number }[] }
const fixture = JSON.parse(readFileSync(new URL('../fixtures/campaign/chi-square-scipy.json', import.meta.url), 'utf8')) as Fixture;

describe('chiSquareUpperTail', () => {
  it('matches scipy.stats.chi2.sf to 1e-12 relative (absolute 1e-300 floor)', () => {
    expect(fixture.chiSquareSf.length).toBeGreaterThan(50);
    for (const c of fixture.chiSquareSf) {
      const got = chiSquareUpperTail(c.x, c.dof);
      if (c.sf < 1e-280) expect(got).toBeLessThan(1e-280);
      else within(got, c.sf, 1e-12, '', `Q(${c.dof}/2, ${c.x}/2)`, { source: fixture.source, relative: true });
    }
  });
  it('ln Γ matches scipy.special.gammaln to 1e-13 absolute', () => {
    for (const c of fixture.logGamma) within(logGamma(c.x), c.lgamma, 1e-13, '', `lnΓ(${c.x})`, { source: fixture.source });
  });
  it('special values: x = 0 gives 1', () => {
    expect(chiSquareUpperTail(0, 4)).toBe(1);
  });
});
