// Pure geodesy: ellipsoids, meridian radius and arc, degree length, degree-coefficient inversion,
// length units, angle parsing and formatting. Degrees and metres at every boundary.
export * from './ellipsoid.ts';
export * from './flattening.ts';
export * from './latitude-policy.ts';
export * from './meridian.ts';
export * from './degree-coefficients.ts';
export type { DegreeArc } from './figure-by-arcs.ts';
export { ARC_INVERSION_F_TOLERANCE, ARC_INVERSION_MAX_ITERATIONS } from './figure-by-arcs.ts';
export * from './polynomial-least-squares.ts';
export * from './units.ts';
export * from './angles.ts';
