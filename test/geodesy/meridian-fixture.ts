// Reads test/fixtures/geodesy/meridian-arcs.json, written by scripts/gen-geodesy-fixtures.ts from
// GeographicLib 2.2 (geographiclib-geodesic). Not a test file: shared by the geodesy tests.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

export interface FixtureEllipsoid {
  id: string;
  semiMajorAxisM: number;
  flattening: number;
  definition: string;
  quadrantM: number;
  distances: { latitudeDeg: number; distanceM: number }[];
  arcs: { fromLatitudeDeg: number; toLatitudeDeg: number; arcM: number }[];
  inverse: { distanceM: number; latitudeDeg: number }[];
  degreeArcs: { fromLatitudeDeg: number; toLatitudeDeg: number; arcM: number }[];
}

export interface MeridianFixture {
  reference: string;
  generator: string;
  seed: number;
  ellipsoids: FixtureEllipsoid[];
}

export const GEOGRAPHICLIB = 'GeographicLib 2.2 via scripts/gen-geodesy-fixtures.ts';

export function loadMeridianFixture(): MeridianFixture {
  const path = fileURLToPath(new URL('../fixtures/geodesy/meridian-arcs.json', import.meta.url));
  return JSON.parse(readFileSync(path, 'utf8')) as MeridianFixture;
}

export function fixtureEllipsoid(fixture: MeridianFixture, id: string): FixtureEllipsoid {
  const found = fixture.ellipsoids.find((e) => e.id === id);
  if (found === undefined) throw new Error(`no ellipsoid ${id} in the geodesy fixture`);
  return found;
}
