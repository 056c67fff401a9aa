/** A seeded source of uniform and standard-normal numbers. */
export interface RandomSource {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
}

/**
 * Seeded generator: xoshiro128** (Blackman & Vigna 2018) seeded through
 * splitmix32, with normals by the Box–Muller transform (Box & Muller 1958,
 * Ann. Math. Stat. 29:610). Same seed, same stream, on every machine.
 *
 * Blackman, D. & Vigna, S. (2018). Scrambled linear pseudorandom number
 * generators. arXiv:1805.01407.
 *
 * @example
 * const random = createRandom(42);
 * random.uniform(); // 0.6606157226783409 (the first draw of seed 42)
 * createRandom(42).uniform() === createRandom(7).uniform(); // false
 */
export function createRandom(seed: number): RandomSource {
  let mix = seed >>> 0;
  const splitmix = (): number => {
    mix = (mix + 0x9e3779b9) >>> 0;
    let z = mix;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let s0 = splitmix();
  let s1 = splitmix();
  let s2 = splitmix();
  let s3 = splitmix();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1;
  const next = (): number => {
    const result = Math.imul(rotate(Math.imul(s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (s1 << 9) >>> 0;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotate(s3, 11);
    return result;
  };
  let spare: number | null = null;
  const uniform = (): number => (next() * 2 ** -32 + (next() >>> 11) * 2 ** -53) % 1;
  return {
    uniform,
    normal(): number {
      if (spare !== null) {
        const value = spare;
        spare = null;
        return value;
      }
      let u = 0;
      while (u === 0) u = uniform();
      const radius = Math.sqrt(-2 * Math.log(u));
      const angle = 2 * Math.PI * uniform();
      spare = radius * Math.sin(angle);
      return radius * Math.cos(angle);
    },
  };
}

function rotate(value: number, bits: number): number {
  return ((value << bits) | (value >>> (32 - bits))) >>> 0;
}
