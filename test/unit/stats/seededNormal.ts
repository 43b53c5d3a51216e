import { uniformFloat64 } from 'pure-rand/distribution/uniformFloat64';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';

/**
 * Seeded standard normal variates for property tests: xoroshiro128+ uniforms (pure-rand)
 * through the Box-Muller transform (Box & Muller 1958, "A note on the generation of random
 * normal deviates", Annals of Mathematical Statistics 29(2)). Deterministic per seed.
 */
export function seededNormals(seed: number, n: number): Float64Array {
  // Mix the seed (golden-ratio multiplier) and skip the first outputs, which are poorly
  // mixed for small seeds.
  const g = xoroshiro128plus(Math.imul(seed ^ 0x5bd1e995, 0x9e3779b9) | 0);
  for (let i = 0; i < 16; i++) g.next();
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 2) {
    const u1 = 1 - uniformFloat64(g); // in (0, 1]
    const u2 = uniformFloat64(g);
    const r = Math.sqrt(-2 * Math.log(u1));
    out[i] = r * Math.cos(2 * Math.PI * u2);
    if (i + 1 < n) out[i + 1] = r * Math.sin(2 * Math.PI * u2);
  }
  return out;
}
