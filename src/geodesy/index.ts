// Pure geodesy: ellipsoids, meridian radius and arc, degree length, degree-coefficient inversion,
// length units, angle parsing and formatting. Degrees and metres at every boundary.
export * from './ellipsoid.ts';
export * from './flattening.ts';
export * from './latitude-policy.ts';
export * from './meridian.ts';
export * from './degree-coefficients.ts';
export * from './projection.ts';
export * from './units.ts';
export * from './angles.ts';
