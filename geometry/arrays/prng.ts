/**
 * mulberry32: a small, well-known 32-bit pseudo-random generator (Tommy Ettinger, public
 * domain, 2017). One 32-bit state word, period 2³², passes the gjrand/PractRand checks its
 * author reports up to a few GB — ample for placement-disorder ensembles. Chosen because it is
 * tiny, fast in JavaScript (Math.imul) and gives identical streams on every engine.
 * Same seed → same sequence; never Math.random in the numerical core.
 */
export function mulberry32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
