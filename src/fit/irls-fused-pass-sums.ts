// What a fused pass (irls-fused-pass.ts) reports beside its n-sized outputs. Its own file so the
// per-estimator loops (irls-huber-pass.ts, irls-tukey-pass.ts) and the dispatcher share it
// without importing each other (type-only imports count as cycles in CI).

/** What a fused pass adds up (the normal equations go into the workspace). */
export interface FusedSums {
  objective: number;
  changed: boolean;
  sumPsi2: number;
  sumD: number;
  sumD2: number;
}
