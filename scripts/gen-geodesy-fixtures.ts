// Writes test/fixtures/geodesy/meridian-arcs.json: meridian distances, arcs and inverse latitudes
// computed by GeographicLib (npm geographiclib-geodesic 2.2.0; C. F. F. Karney, "Algorithms for
// geodesics", J. Geodesy 87, 2013, accurate to ~15 nm), for the test/geodesy suite.
// Run: npx tsx scripts/gen-geodesy-fixtures.ts
//
// Independent of the code under test on purpose: the defining constants are copied here from
// the team notes (shared/check-values.md) (the test checks that src/geodesy carries the same numbers), and
// every distance comes from GeographicLib's geodesic solver, never from src/geodesy.
//   G(φ)      = Inverse(0, 0, φ, 0).s12, negated for φ < 0 (a geodesic along the meridian)
//   arc       = Inverse(φ₁, 0, φ₂, 0).s12, signed positive northwards
//   inverse   = Direct(0, 0, azimuth 0 or 180, |s|).lat2
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import geodesic from 'geographiclib-geodesic';

const SEED = 20260602;

interface Definition { id: string; a: number; f: number; definition: string }
// (a − b)/a for the two figures defined by b; the subtraction is exact in doubles (Sterbenz).
const DEFINITIONS: Definition[] = [
  { id: 'wgs84', a: 6378137, f: 1 / 298.257223563, definition: 'a = 6378137 m, 1/f = 298.257223563' },
  { id: 'grs80', a: 6378137, f: 1 / 298.257222101, definition: 'a = 6378137 m, 1/f = 298.257222101' },
  { id: 'intl1924', a: 6378388, f: 1 / 297, definition: 'a = 6378388 m, 1/f = 297' },
  { id: 'clarke1866', a: 6378206.4, f: (6378206.4 - 6356583.8) / 6378206.4, definition: 'a = 6378206.4 m, b = 6356583.8 m' },
  { id: 'airy1830', a: 6377563.396, f: (6377563.396 - 6356256.909) / 6377563.396, definition: 'a = 6377563.396 m, b = 6356256.909 m' },
  // Invented stress figures at the edge of the accepted |f| ≤ 0.05: there the n⁵ and n⁶ terms of
  // the series are worth centimetres and millimetres, so these rows check every coefficient
  // (at the Earth's n they are below 1e-9 m and no table could see them).
  { id: 'stress-oblate-20', a: 6400000, f: 1 / 20, definition: 'invented: a = 6400000 m, 1/f = 20' },
  { id: 'stress-prolate-20', a: 6400000, f: -1 / 20, definition: 'invented: a = 6400000 m, 1/f = -20 (prolate)' },
];

/** Mid latitudes of the one-degree arcs used by the degree-coefficient tests: 5° … 65°. */
const DEGREE_ARC_MID_LATITUDES_DEG = Array.from({ length: 61 }, (_, i) => 5 + i);

const LATITUDES_DEG = [
  0, 1e-9, 1e-6, 1e-3, 0.1, 0.5,
  ...Array.from({ length: 89 }, (_, i) => i + 1),
  12.3456789, 33.3333333, 47.1234567, 60.0000001, 89.9, 89.99, 89.9999, 89.999999, 90,
  -1e-9, -12.3456789, -45, -89.999999, -90,
];

/** mulberry32: a small seeded generator, so the fixture is reproducible from SEED. */
function mulberry32(seed: number): () => number {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r = (r + Math.imul(r ^ (r >>> 7), 61 | r)) ^ r;
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

function build(): unknown {
  const random = mulberry32(SEED);
  const ellipsoids = DEFINITIONS.map((d) => {
    const geod = new geodesic.Geodesic.Geodesic(d.a, d.f);
    const meridianS12 = (lat1: number, lat2: number): number => {
      const s12 = geod.Inverse(lat1, 0, lat2, 0).s12;
      if (s12 === undefined) throw new Error(`GeographicLib gave no s12 for ${lat1} → ${lat2}`);
      return s12;
    };
    const quadrantM = meridianS12(0, 90);
    const distances = LATITUDES_DEG.map((latitudeDeg) => ({
      latitudeDeg,
      distanceM: latitudeDeg < 0 ? -meridianS12(0, latitudeDeg) : meridianS12(0, latitudeDeg),
    }));
    const arcs = Array.from({ length: 60 }, (_, i) => {
      // The first half spans the whole meridian; the second half are short field-sized arcs.
      const fromLatitudeDeg = -90 + 180 * random();
      const span = i < 30 ? -90 + 180 * random() - fromLatitudeDeg : (random() - 0.5) * 6;
      const toLatitudeDeg = Math.max(-90, Math.min(90, fromLatitudeDeg + span));
      const s12 = meridianS12(fromLatitudeDeg, toLatitudeDeg);
      return { fromLatitudeDeg, toLatitudeDeg, arcM: toLatitudeDeg < fromLatitudeDeg ? -s12 : s12 };
    });
    const inverse = [0, quadrantM, -quadrantM, ...Array.from({ length: 40 }, () => (2 * random() - 1) * quadrantM)]
      .map((distanceM) => {
        const lat2 = geod.Direct(0, 0, distanceM < 0 ? 180 : 0, Math.abs(distanceM)).lat2;
        if (lat2 === undefined) throw new Error(`GeographicLib gave no lat2 for ${distanceM}`);
        return { distanceM, latitudeDeg: lat2 };
      });
    const degreeArcs = DEGREE_ARC_MID_LATITUDES_DEG.map((midLatitudeDeg) => ({
      fromLatitudeDeg: midLatitudeDeg - 0.5, toLatitudeDeg: midLatitudeDeg + 0.5,
      arcM: meridianS12(midLatitudeDeg - 0.5, midLatitudeDeg + 0.5),
    }));
    return { id: d.id, semiMajorAxisM: d.a, flattening: d.f, definition: d.definition, quadrantM, distances, arcs, inverse, degreeArcs };
  });
  return {
    reference: 'GeographicLib 2.2.0 (npm geographiclib-geodesic): Geodesic.Inverse along the meridian, Geodesic.Direct for the inverse',
    generator: 'scripts/gen-geodesy-fixtures.ts',
    seed: SEED,
    units: 'degrees and metres; distances negative south of the equator, arcs positive northwards',
    ellipsoids,
  };
}

const target = fileURLToPath(new URL('../test/fixtures/geodesy/meridian-arcs.json', import.meta.url));
mkdirSync(fileURLToPath(new URL('../test/fixtures/geodesy/', import.meta.url)), { recursive: true });
// One row per line, so a regenerated table diffs row by row.
const text = JSON.stringify(build(), null, 1)
  .replace(/\{\n\s*([^{}[\]]*?)\n\s*\}/g, (_, body: string) => `{${body.replace(/\n\s*/g, ' ')}}`);
writeFileSync(target, text + '\n');
process.stdout.write(`wrote ${target}\n`);
