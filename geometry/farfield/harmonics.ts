/**
 * Real solid harmonics up to order 4 with Racah normalisation,
 *   R_lm(r) = √(4π/(2l+1)) r^l Y_lm(r̂)   (regular),   I_lm(r) = R_lm(r) / r^{2l+1}   (irregular),
 * in the real basis C_lm (m ≥ 0) and S_l|m| (m < 0). Stored flat at index l² + l + m, so a
 * set up to order L holds (L+1)² numbers:
 *
 *   l = 0: [C00]
 *   l = 1: [S11, C10, C11]                 = [y, z, x]
 *   l = 2: [S22, S21, C20, C21, C22]  ...
 *
 * With this normalisation the addition theorem reads Σ_m R_lm(a) R_lm(b) = |a|^l |b|^l P_l(cos γ)
 * (tested), so 1/|x − y| = Σ_lm R_lm(y) I_lm(x) for |y| < |x|: a density's moments
 * Q_lm = ∫ρ R_lm(y − c) give the far potential φ(x) = Σ Q_lm I_lm(x − c). A point charge q at
 * offset d has Q_lm = q R_lm(d); Q_l0 is the axial moment ∫ρ r^l P_l(cosθ).
 * Polynomials: the standard table of real solid harmonics (e.g. Wikipedia "Solid harmonics",
 * real form, Racah normalisation); the tests check harmonicity and the addition theorem.
 */
export const MAX_ORDER = 4;

export function harmonicCount(order: number): number {
  return (order + 1) * (order + 1);
}

const S3 = Math.sqrt(3);
const S15 = Math.sqrt(15);
const S3_8 = Math.sqrt(3 / 8);
const S5_8 = Math.sqrt(5 / 8);
const S10_4 = Math.sqrt(10) / 4;
const S5_4 = Math.sqrt(5) / 4;
const S5_2 = Math.sqrt(5) / 2;
const S70_4 = Math.sqrt(70) / 4;
const S35_8 = Math.sqrt(35) / 8;
const S35_2 = Math.sqrt(35) / 2;

/** Regular real solid harmonics R_lm(x, y, z) for l ≤ order (≤ 4), written into out. */
export function regularHarmonics(x: number, y: number, z: number, order: number, out: Float64Array): Float64Array {
  out[0] = 1;
  if (order < 1) return out;
  out[1] = y;
  out[2] = z;
  out[3] = x;
  if (order < 2) return out;
  const x2 = x * x, y2 = y * y, z2 = z * z;
  const r2 = x2 + y2 + z2;
  out[4] = S3 * x * y;
  out[5] = S3 * y * z;
  out[6] = (3 * z2 - r2) / 2;
  out[7] = S3 * x * z;
  out[8] = (S3 / 2) * (x2 - y2);
  if (order < 3) return out;
  out[9] = S5_8 * y * (3 * x2 - y2);
  out[10] = S15 * x * y * z;
  out[11] = S3_8 * y * (5 * z2 - r2);
  out[12] = (z * (5 * z2 - 3 * r2)) / 2;
  out[13] = S3_8 * x * (5 * z2 - r2);
  out[14] = (S15 / 2) * z * (x2 - y2);
  out[15] = S5_8 * x * (x2 - 3 * y2);
  if (order < 4) return out;
  out[16] = S35_2 * x * y * (x2 - y2);
  out[17] = S70_4 * y * z * (3 * x2 - y2);
  out[18] = S5_2 * x * y * (7 * z2 - r2);
  out[19] = S10_4 * y * z * (7 * z2 - 3 * r2);
  out[20] = (35 * z2 * z2 - 30 * r2 * z2 + 3 * r2 * r2) / 8;
  out[21] = S10_4 * x * z * (7 * z2 - 3 * r2);
  out[22] = S5_4 * (x2 - y2) * (7 * z2 - r2);
  out[23] = S70_4 * x * z * (x2 - 3 * y2);
  out[24] = S35_8 * (x2 * x2 - 6 * x2 * y2 + y2 * y2);
  return out;
}

/** Irregular harmonics I_lm = R_lm / r^{2l+1} for l ≤ order. */
export function irregularHarmonics(x: number, y: number, z: number, order: number, out: Float64Array): Float64Array {
  regularHarmonics(x, y, z, order, out);
  const r2 = x * x + y * y + z * z;
  const inv = 1 / Math.sqrt(r2);
  let f = inv; // 1/r^{2l+1}
  const inv2 = inv * inv;
  for (let l = 0; l <= order; l++) {
    for (let m = -l; m <= l; m++) out[l * l + l + m] *= f;
    f *= inv2;
  }
  return out;
}

const scratch = new Float64Array(harmonicCount(MAX_ORDER));

/**
 * Potential (εr = 1, nm⁻¹) at (x, y, z) of a multipole expansion with moments Q (about
 * `center`) truncated at `order`: Σ_{l ≤ order} Σ_m Q_lm I_lm(x − c).
 */
export function multipolePotential(moments: Float64Array, order: number, center: readonly number[], x: number, y: number, z: number): number {
  irregularHarmonics(x - center[0], y - center[1], z - center[2], order, scratch);
  let s = 0;
  const n = harmonicCount(order);
  for (let i = 0; i < n; i++) s += moments[i] * scratch[i];
  return s;
}
