// A small seeded random source for the demo campaign (deterministic across platforms: 32-bit
// integer arithmetic only). Uniforms from the mulberry32 generator (public-domain, period 2³²);
// normals by the Box–Muller transform. Not for cryptography; not for statistics beyond a demo.
export interface SeededRandom {
  /** Uniform on (0, 1). */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
}

export function seededRandom(seed: number): SeededRandom {
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    // +0.5 keeps the value strictly inside (0, 1), so log(u) in Box–Muller is finite.
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  let spare: number | null = null;
  const normal = (): number => {
    if (spare !== null) {
      const v = spare;
      spare = null;
      return v;
    }
    const r = Math.sqrt(-2 * Math.log(uniform()));
    const theta = 2 * Math.PI * uniform();
    spare = r * Math.sin(theta);
    return r * Math.cos(theta);
  };
  return { uniform, normal };
}
