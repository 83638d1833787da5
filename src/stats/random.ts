/**
 * Seeded pseudo-random numbers: every resampling and simulation takes one of these, so the same
 * seed gives byte-identical output.
 *
 * Variant: sfc32 (Chris Doty-Humphrey's "small fast counting" generator, PractRand suite, 2010s),
 * 128-bit state seeded through splitmix32 so that nearby seeds give unrelated streams. Passes
 * PractRand to terabytes; not cryptographic. `uniform()` returns a double in [0, 1) with 32 random
 * bits; `normal()` uses the Box–Muller transform (Box & Muller 1958), caching the second draw.
 *
 * Example: `const r = createRandom(42); r.uniform()` gives the same number on every machine.
 */
export interface Random {
  /** Uniform double in [0, 1). */
  uniform(): number;
  /** Standard normal deviate. */
  normal(): number;
  /** Integer in [0, n). */
  int(n: number): number;
  /** A new generator whose stream is independent of this one's future draws. */
  fork(): Random;
}

function splitmix32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x9e3779b9) >>> 0;
    let z = state;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

export function createRandom(seed: number): Random {
  if (!Number.isFinite(seed)) throw new RangeError(`seed must be a finite number, got ${seed}`);
  const mix = splitmix32(Math.floor(seed) ^ Math.floor(seed / 2 ** 32));
  let a = mix();
  let b = mix();
  let c = mix();
  let d = mix();
  let spare: number | undefined;
  const next32 = (): number => {
    const t = (((a + b) >>> 0) + d) >>> 0;
    d = (d + 1) >>> 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) >>> 0;
    c = ((c << 21) | (c >>> 11)) >>> 0;
    c = (c + t) >>> 0;
    return t;
  };
  for (let i = 0; i < 12; i++) next32();
  const random: Random = {
    uniform: () => next32() / 4294967296,
    normal: () => {
      if (spare !== undefined) {
        const s = spare;
        spare = undefined;
        return s;
      }
      let u = 0;
      while (u === 0) u = random.uniform();
      const v = random.uniform();
      const radius = Math.sqrt(-2 * Math.log(u));
      spare = radius * Math.sin(2 * Math.PI * v);
      return radius * Math.cos(2 * Math.PI * v);
    },
    int: (n: number) => Math.floor(random.uniform() * n),
    fork: () => createRandom(next32() * 4294967296 + next32()),
  };
  return random;
}
