/**
 * Gate lever arms: how much each site's energy moves per volt on each electrode.
 *
 * For every electrode g, φ_g solves the Laplace problem of the device
 *
 *     −∇·(εr ∇φ_g) = 0   in the domain outside the metal,
 *     φ_g = 1 V on electrode g, 0 V on the others, walls per design.domain.electrodeWalls
 *
 * (device.ts: εr per region and the conformity check; electrodes.ts: Dirichlet dofs). A carrier of charge q bound at site i with the
 * unit density ρ_i changes its energy by q∫ρ_i φ_g per volt on g, so
 *
 *     ∂E_i/∂V_g = −e ∫ρ_i φ_g  = −1000 · ∫ρ_i φ_g  meV/V   for an electron (donors),
 *               = +1000 · ∫ρ_i φ_g  meV/V                  for a hole (species B),
 *
 * negative for an electron under a positive gate. φ_g is harmonic inside each layer away from metal,
 * so where site i's harmonic ball holds all but a negligible tail of ρ_i the integral is the centre
 * value φ_g(p_i) (mean-value.ts: the mean-value property; the neglected part is at most the tail
 * charge in V/V because 0 ≤ φ_g ≤ 1, and that bound is added to the bar); elsewhere it is load·φ,
 * ∫ρ_i φ_g = Σ_k f_i[k] φ_g[k] with f_i = ∫ρ_i v_k from load.ts. Superposition gives the site energies at the design's voltages,
 * E_i = Σ_g (∂E_i/∂V_g) V_g (against every electrode at 0 V).
 *
 * One mesh: one stiffness matrix, one lifting, one multigrid preconditioner for all electrodes
 * (only the Dirichlet values change between them). Error bars: the lever arms on nested meshes
 * (leverFamily: one bisection mesh refined level by level to size targets graded towards the
 * electrode edges), extrapolated with the error-bar rule of the Coulomb solver, errorbars.ts
 * `richardson` (grid convergence index, s = N^(−1/3), theoretical rate 2p for the load: ∫ρφ is a
 * smooth linear functional of φ, whose error is the square of the energy-norm error, Aubin–Nitsche
 * duality; e.g. Ciarlet 1978, §3.2; p + 1 for a centre value, mean-value.ts; both capped by the
 * edges' pollution on the graded family, leverTheoreticalRate).
 *
 * Assumptions (stated with every result): ideal metal at a fixed voltage, planar layers infinite
 * in x and y within the domain, no free charge other than the site's (no screening by other
 * carriers, no depletion), the walls' condition as chosen in the design.
 */
import type { Design, Orbital, Vec3 } from '../design/types';
import { resolveOrbital } from '../design/presets';
import type { CoreProgress } from '../progress';
import { CoreError, throwIfAborted } from '../errors';
import { meshDesign, refineToSize, toTetMesh, type MeshDesignOptions } from '../mesh/index';
import { sizeFieldFromDesign, SizeField, ELECTRODE_EDGE_DIVISOR } from '../mesh/sizefield';
import { clippedElectrodes, electrodeEdgeSegments } from '../mesh/device';
import type { TetMesh } from '../mesh/types';
import { buildSpace, type FeSpace } from './space';
import { assembleStiffness, applyDirichlet, applyDirichletRhs } from './assemble';
import { multigridPreconditioner } from './multigrid';
import { jacobi, type Preconditioner } from './pcg';
import { blockPcg, BLOCK_WIDTH } from './block-pcg';
import type { Csr } from './csr';
import { densityLoad } from './load';
import { locatePoints, valuesAtPoints } from './locate';
import { meanValueSites, pointValueRate } from './mean-value';
import { richardson } from './errorbars';
import { deviceMesh, epsByRegion } from './device';
import { electrodeDofs, electrodeValues } from './electrodes';

/** The model behind every lever arm, in plain words for the CLI, the jobs and the studio. */
export const LEVER_ARM_ASSUMPTIONS: readonly string[] = [
  'Electrodes are ideal metal held at a fixed voltage; a heavily doped lead is modelled as such a metal.',
  'Layers are planar and infinite in x and y within the domain; each has one relative permittivity.',
  'No charge other than the site\'s own density (no screening by other carriers, no depletion); the site\'s orbital does not change with the voltages.',
  'Domain walls for the electrodes\' problem: grounded (0 V), or zero normal field, as the design says.',
  'Lever arms and site energies are estimates, to be confirmed by the group\'s own validated methods before any fabrication or design decision.',
];

export interface LeverArmOptions {
  /** element order (default design.refinement.order) */
  order?: 1 | 2;
  /** nested meshes for the error bar (default 3, at least 2) */
  levels?: number;
  /** the family's grading (β_E, level ratio); see LeverGrading */
  grading?: LeverGrading;
  /** extra options of the finest mesh (the coarser levels scale its sizes; electrodeEdgeNm is the finest level's edge size) */
  mesh?: MeshDesignOptions;
  /** PCG relative residual (default 1e-10) */
  solverTol?: number;
  preconditioner?: 'multigrid' | 'jacobi';
  onProgress?: (p: CoreProgress) => void;
  signal?: { readonly aborted: boolean };
}

export interface LeverArm {
  site: string;
  electrode: string;
  meVPerV: number;
  errorMeVPerV: number;
}

export interface LeverSiteEnergy {
  id: string;
  /** Σ_g (∂E/∂V_g) V_g at the design's voltages, against all electrodes at 0 V (eV) */
  eV: number;
  errorEv: number;
}

export interface LeverLevel {
  elements: number;
  dofs: number;
  iterations: number;
  /** this level's lever arms, site-major like `leverArms` (meV/V) */
  meVPerV: number[];
}

export interface LeverArmResult {
  order: 1 | 2;
  walls: 'grounded' | 'zero-normal-field';
  /** site-major: every electrode for the first site, then the next site */
  leverArms: LeverArm[];
  siteEnergies: LeverSiteEnergy[];
  levels: LeverLevel[];
  assumptions: readonly string[];
  notes: string[];
}

interface LeverSite {
  id: string;
  orbital: Orbital;
  position: Vec3;
  /** −1 electron, +1 hole */
  sign: number;
}

/** Sites with a carrier (electrons > 0); an acceptor (B) binds a hole. */
export function leverSites(design: Design): LeverSite[] {
  const { center, halfExtentsNm } = design.domain;
  const out: LeverSite[] = [];
  for (const s of design.sites) {
    if (!(s.electrons > 0)) continue;
    if (s.position.some((x, k) => !(Math.abs(x - center[k]) < halfExtentsNm[k]))) {
      throw new CoreError('site-outside', `site "${s.id}" is not strictly inside the domain: enlarge the box or move the site`, { siteId: s.id });
    }
    out.push({ id: s.id, orbital: resolveOrbital(s), position: s.position, sign: s.species === 'B' ? 1 : -1 });
  }
  return out;
}

/** One mesh's lever arms: sites × electrodes (meV/V, site-major) and the solver's figures. */
export interface LeverOnMesh {
  meVPerV: Float64Array;
  dofs: number;
  iterations: number;
  /** 1 where the site's lever arms are centre values φ_g(p_i) (mean-value.ts), per site */
  pointValue: Uint8Array;
  /** charge of the site's density beyond its harmonic ball (bounds the centre value's error in V/V) */
  tail: Float64Array;
  /** the electrodes' potentials φ_g (V per V) on every dof, one per electrode */
  potentials: Float64Array[];
  space: FeSpace;
}

export function leverArmsOnMesh(design: Design, meshIn: TetMesh, order: 1 | 2, opts: LeverArmOptions = {}, level = 1, fraction: [number, number] = [0, 1]): LeverOnMesh {
  const electrodes = design.electrodes ?? [];
  const sites = leverSites(design);
  const m = electrodes.length;
  // regions from the design, and the refusal of a mesh that does not follow the device
  const space = buildSpace(deviceMesh(design, meshIn), order);
  const eps = epsByRegion(design);
  const K = assembleStiffness(space, eps);
  const dofs = electrodeDofs(space, design);
  dofs.perElectrode.forEach((count, g) => {
    if (count === 0) {
      throw new CoreError('electrode-outside', `electrode "${electrodes[g].name}" has no volume inside the domain: move it into the box or enlarge the box`, { electrode: electrodes[g].name });
    }
  });
  // the multigrid hierarchy treats `boundaryDof` as the Dirichlet set: give it the electrodes' one
  const fixedSpace: FeSpace = { ...space, boundaryDof: dofs.fixed };
  const n = space.nDofs;
  const zero = new Float64Array(n);
  const report = (f: number): void => opts.onProgress?.({ phase: 'solve', level, fraction: fraction[0] + (fraction[1] - fraction[0]) * f });
  // one stiffness, one lifting and one multigrid for all electrodes; the electrodes' Laplace
  // problems are solved together in blocks (block-pcg.ts: the same numbers as one by one)
  let A: Csr | null = null;
  let M: Preconditioner | null = null;
  let iterations = 0;
  const potentials: Float64Array[] = [];
  for (let g0 = 0; g0 < m; g0 += BLOCK_WIDTH) {
    throwIfAborted(opts.signal);
    const g1 = Math.min(m, g0 + BLOCK_WIDTH);
    const rhs: Float64Array[] = [];
    const x0: Float64Array[] = [];
    for (let g = g0; g < g1; g++) {
      const gv = electrodeValues(dofs, g);
      if (!A) {
        const sys = applyDirichlet(K, zero, dofs.fixed, gv);
        A = sys.A;
        rhs.push(sys.b);
        M = opts.preconditioner === 'jacobi' ? jacobi(A) : multigridPreconditioner(fixedSpace, A, { epsByRegion: eps });
      } else rhs.push(applyDirichletRhs(K, zero, dofs.fixed, gv));
      x0.push(gv);
    }
    const names = electrodes.slice(g0, g1).map((e) => e.name).join(', ');
    const results = blockPcg(A!, rhs, x0, {
      preconditioner: M!,
      tol: opts.solverTol ?? 1e-10,
      maxIter: 5000,
      signal: opts.signal,
      stage: `electrodes ${names}`,
      onProgress: (_stage, f) => report((g0 + (g1 - g0) * f) / (m + 1)),
    });
    results.forEach((res, c) => {
      const name = electrodes[g0 + c].name;
      if (!res.converged) {
        throw new CoreError('solver-failed', `the solver did not reach its tolerance for electrode ${name} (relative residual ${res.relResidual.toExponential(2)} after ${res.iterations} iterations)`, {
          electrode: name,
          relResidual: res.relResidual,
          iterations: res.iterations,
        });
      }
      iterations = Math.max(iterations, res.iterations);
      potentials.push(res.x);
    });
  }
  const meVPerV = new Float64Array(sites.length * m);
  const mv = meanValueSites(design, sites);
  // the centre values: every site located once, every potential read there
  const pts = new Float64Array(3 * sites.length);
  sites.forEach((st, k) => pts.set(st.position, 3 * k));
  const located = mv.ok.some((x) => x === 1) ? locatePoints(space.mesh, pts) : null;
  const centre = located ? potentials.map((phi) => valuesAtPoints(space, located, phi)) : [];
  sites.forEach((site, i) => {
    throwIfAborted(opts.signal);
    opts.onProgress?.({ phase: 'load', level, site: site.id, fraction: fraction[0] + (fraction[1] - fraction[0]) * ((m + i / sites.length) / (m + 1)) });
    if (mv.ok[i]) {
      for (let g = 0; g < m; g++) meVPerV[i * m + g] = site.sign * 1000 * centre[g][i];
      return;
    }
    const L = densityLoad(space, site.orbital, site.position).load;
    for (let g = 0; g < m; g++) {
      const phi = potentials[g];
      let s = 0;
      for (let k = 0; k < n; k++) s += L[k] * phi[k];
      meVPerV[i * m + g] = site.sign * 1000 * s;
    }
  });
  return { meVPerV, dofs: n, iterations, pointValue: mv.ok, tail: mv.tail, potentials, space };
}

/**
 * Grading exponent β_E of the lever family towards the electrode edges (graded meshes in the sense
 * of Apel, Sändig & Whiteman, Math. Methods Appl. Sci. 19 (1996) 63–85; from memory): near an edge
 * level l wants h_l(d) = c_l · d^{β_E} (sizefield.ts ElectrodeEdgeSpec: h_E·max(1, d/h_E)^{β_E} =
 * h_E^{1−β_E} d^{β_E}), and c_l shrinks from level to level by the bulk's ratio r (LEVER_LEVEL_RATIO),
 * so the edge size h_E shrinks by r^{1/(1−β_E)} per level (r² for β_E = 1/2) while hmax shrinks by r.
 * With μ = 1 − β_E the energy error near an edge of exponent λ falls like h^{min(p, λ/μ)}, a
 * functional's like its square (from memory, same source): μ = 1/2 gives h^{2λ/μ} = h^{2}…h^{2.67}
 * for λ from 1/2 to 2/3, against h^{2λ} for uniform refinement (observed 1.3–1.4 before, issue 11).
 * Measured on the README's quad (P2, 3 levels at ratio 2, finest h_E = hmax/8): β_E = 1/2 observed
 * 1.7–2.1 in s = N^{−1/3}; β_E = 2/3 (edge ratio 8) left the coarser levels ungraded (rate 1.1).
 */
export const LEVER_EDGE_EXPONENT = 0.5;

/**
 * The finest level's electrode-edge size relative to the design's hmax (measured on the issue 11 device
 * bench 10×10, hmax 16.75 nm, and the README's quad, hmax 15 nm; P2, three levels at ratio √2, CPU time
 * under a load average of 3–8): hmax/9 gave worst bars of 1.9 % (bench, 441k unknowns, 9.3 s) and 1.1 %
 * (quad, 25 s); hmax/10 1.5 % (bench, 625k, 15 s) and 0.90 % (quad, 565k, about 25 s); hmax/12 1.08 %
 * (bench, 744k, 20 s, 1.1 GB); 1.2 nm (hmax/14) 0.77 % (bench, 1.13M, 38 s). Bisection makes sizes in
 * steps, so the unknowns jump with the fraction. The bench's gates are 2 nm apart, so even the finest
 * edge size is not small against the gap: the observed rates (1.3–1.5 there, 1.8–2.1 on the quad) sit
 * at the lower end of the asymptotic range, and many bars keep the safety factor 3.
 */
export const LEVER_FINEST_EDGE_FRACTION = 1 / 12;

/**
 * The smallest edge exponent λ of the potential near a metal edge in a layered host: 2/3 for a
 * re-entrant right-angled edge in one dielectric (Jackson §2.11), down to 1/2 for a metal edge on a
 * dielectric interface as the permittivity contrast grows (sizefield.ts ElectrodeEdgeSpec; 0.566 for
 * a gate on SiO₂ under vacuum). The lever family's theoretical rate uses this bound.
 */
export const EDGE_EXPONENT_LOWER_BOUND = 0.5;

/**
 * Theoretical rate of a lever arm on the graded family, in s = N^{−1/3} (N unknowns; the Apel grading
 * keeps N ∝ h^{−3}, so s ∝ h): the smooth rate (2p for the load, p + 1 for a centre value), capped by
 * the edges' pollution 2λ/μ with λ ≥ EDGE_EXPONENT_LOWER_BOUND and μ = 1 − β_E (LEVER_EDGE_EXPONENT).
 * A design without electrode edges inside the domain (plates spanning it) keeps the smooth rate.
 */
export function leverTheoreticalRate(order: 1 | 2, pointValue: boolean, hasEdges: boolean, edgeExponent = LEVER_EDGE_EXPONENT): number {
  const smooth = pointValue ? pointValueRate(order) : 2 * order;
  if (!hasEdges) return smooth;
  return Math.min(smooth, (2 * EDGE_EXPONENT_LOWER_BOUND) / (1 - edgeExponent));
}

/** The lever family's grading: β_E towards electrode edges and the bulk size ratio between levels. */
export interface LeverGrading {
  /** β_E in (0, 1) (default LEVER_EDGE_EXPONENT) */
  edgeExponent?: number;
  /** bulk size ratio between consecutive levels, > 1 (default LEVER_LEVEL_RATIO) */
  levelRatio?: number;
}

/**
 * Bulk size ratio r between consecutive lever levels (measured on the device bench 10×10, P2, three
 * levels, finest h_E = hmax/8): with r = 2 the coarsest level's edge size was 16× the finest's and
 * pre-asymptotic (observed rates 0.7–1.5, worst bar 4.1 %, 8.8 s CPU); r = √2 (edge size ×2 per level)
 * keeps the coarse levels near the finest (rate 1.46, worst bar 2.0 %, 14 s CPU).
 */
export const LEVER_LEVEL_RATIO = Math.SQRT2;

/** Per-level sizes of the lever family (nm), coarsest level first; see leverFamily. */
export interface LeverLevelSizes {
  hmaxNm: number;
  h0Nm: number;
  electrodeEdgeNm: number;
  electrodeEdgeExponent: number;
}

/**
 * The sizes of each level: level l of L has hmax·r^k and h0·r^k (k = L − 1 − l, r the level ratio) and
 * the edge size h_E·(r^{1/(1−β_E)})^k, capped at that level's hmax; h_E is the given electrodeEdgeNm or
 * LEVER_FINEST_EDGE_FRACTION·hmax. Sites get no core of their own (h0 = hmax) when every one reads
 * φ_g at its centre (mean-value.ts: φ_g is smooth there on the device's scale), and hmax/4 otherwise,
 * unless h0Nm is given (load.ts integrates a density accurately on elements larger than the orbital).
 */
export function leverLevelSizes(design: Design, order: 1 | 2, levels: number, meshOpts: MeshDesignOptions = {}, grading: LeverGrading = {}): LeverLevelSizes[] {
  const edgeExponent = grading.edgeExponent ?? LEVER_EDGE_EXPONENT;
  const ratio = grading.levelRatio ?? LEVER_LEVEL_RATIO;
  if (!(ratio > 1)) throw new CoreError('bad-size-field', `the lever family's level ratio must exceed 1, got ${ratio}`, { levelRatio: ratio });
  if (!(edgeExponent > 0 && edgeExponent < 1)) throw new CoreError('bad-size-field', `the lever family's edge grading exponent must lie strictly between 0 and 1, got ${edgeExponent}`, { edgeExponent });
  const hmax = sizeFieldFromDesign(design, { order, ...meshOpts }).spec.hmaxNm;
  const allCentres = meanValueSites(design, leverSites(design)).ok.every((x) => x === 1);
  const h0 = meshOpts.h0Nm ?? (allCentres ? hmax : hmax / ELECTRODE_EDGE_DIVISOR);
  const hE = meshOpts.electrodeEdgeNm ?? LEVER_FINEST_EDGE_FRACTION * hmax;
  const edgeRatio = Math.pow(ratio, 1 / (1 - edgeExponent));
  const out: LeverLevelSizes[] = [];
  for (let l = 0; l < levels; l++) {
    const k = levels - 1 - l;
    const hm = hmax * Math.pow(ratio, k);
    out.push({ hmaxNm: hm, h0Nm: Math.min(hm, h0 * Math.pow(ratio, k)), electrodeEdgeNm: Math.min(hm, hE * Math.pow(edgeRatio, k)), electrodeEdgeExponent: edgeExponent });
  }
  return out;
}

/**
 * The nested meshes of the lever arms, coarsest first (issue 11 "Speed"; φ_g is singular at the
 * electrodes' re-entrant edges, d^λ, so uniform refinement converged like h^{4/3} and the bars were
 * wide): the base is the design's mesh with level 0's sizes (leverLevelSizes), and each finer level
 * is the same bisection mesh refined further, only where its elements exceed that level's size field
 * (refineToSize): the bulk's size shrinks by r, the edge size faster (graded, LEVER_EDGE_EXPONENT).
 * One bisection mesh keeps the levels nested (every coarse vertex is a fine vertex, at the same index)
 * and the output deterministic. Richardson (errorbars.ts) gets s = N^{−1/3}, N the unknowns, not the
 * nominal h: the grading keeps N ∝ h^{−3} in the bulk and the edge zone alike, but bisection only
 * makes sizes in steps (edge lengths halve every three bisections), so the realised ratio differs
 * from r (1.5–1.7 measured for r = √2) and only N says what it was.
 * The design's own edge grading (meshOpts.electrodeEdgeExponent) is not used here: the family's
 * convergence rate depends on its own (`grading`). A given meshOpts.electrodeEdgeNm is the finest
 * level's edge size.
 */
export function leverFamily(design: Design, order: 1 | 2, levels: number, meshOpts: MeshDesignOptions = {}, grading: LeverGrading = {}): TetMesh[] {
  const sizes = leverLevelSizes(design, order, levels, meshOpts, grading);
  const base = meshDesign(design, { order, ...meshOpts, ...sizes[0], keepBisectionMesh: true });
  const bm = base.bisectionMesh!;
  const maxTets = Math.min(meshOpts.maxElements ?? design.refinement.maxElements, meshOpts.hardCap ?? Infinity);
  const out: TetMesh[] = [toTetMesh(bm)];
  for (let l = 1; l < levels; l++) {
    const { spec } = sizeFieldFromDesign(design, { order, ...meshOpts, ...sizes[l] });
    const before = bm.nTets;
    refineToSize(bm, new SizeField(spec).tooLarge, { maxTets });
    // a level whose sizes the coarser mesh already meets (a small domain: the initial grid between the
    // device's planes is finer than the coarse levels' sizes) is the same mesh: it replaces the coarser
    // copy, so every returned level is distinct (Richardson needs s_c > s_f)
    if (bm.nTets === before) out.pop();
    out.push(toTetMesh(bm));
  }
  return out;
}

/**
 * Lever arms (sites × electrodes) with error bars and the site energies at the design's voltages.
 * A design without electrodes gives empty lists. Refuses (CoreError 'electrode-outside') an
 * electrode with no volume inside the domain.
 */
export function solveLeverArms(design: Design, opts: LeverArmOptions = {}): LeverArmResult {
  const order = opts.order ?? design.refinement.order;
  const electrodes = design.electrodes ?? [];
  const walls = design.domain.electrodeWalls ?? 'grounded';
  const result: LeverArmResult = { order, walls, leverArms: [], siteEnergies: [], levels: [], assumptions: LEVER_ARM_ASSUMPTIONS, notes: [] };
  if (electrodes.length === 0) return result;
  const clipped = new Set(clippedElectrodes(design).map((e) => e.index));
  electrodes.forEach((e, g) => {
    if (!clipped.has(g)) throw new CoreError('electrode-outside', `electrode "${e.name}" has no volume inside the domain: move it into the box or enlarge the box`, { electrode: e.name });
  });
  const sites = leverSites(design);
  const m = electrodes.length;
  opts.onProgress?.({ phase: 'mesh', fraction: 0 });
  const edgeExponent = opts.grading?.edgeExponent ?? LEVER_EDGE_EXPONENT;
  const meshes = leverFamily(design, order, Math.max(2, Math.floor(opts.levels ?? 3)), opts.mesh ?? {}, opts.grading);
  const hasEdges = electrodeEdgeSegments(design).length > 0;
  const w = meshes.map((mesh) => mesh.tets.length);
  const wSum = w.reduce((a, b) => a + b, 0);
  let done = 0;
  const s: number[] = [];
  const values: Float64Array[] = [];
  let point: Uint8Array = new Uint8Array(sites.length);
  let tail: Float64Array = new Float64Array(sites.length);
  meshes.forEach((mesh, l) => {
    const r = leverArmsOnMesh(design, mesh, order, opts, l + 1, [done / wSum, (done + w[l]) / wSum]);
    point = r.pointValue;
    tail = r.tail;
    done += w[l];
    s.push(Math.pow(r.dofs, -1 / 3));
    values.push(r.meVPerV);
    result.levels.push({ elements: mesh.tets.length / 4, dofs: r.dofs, iterations: r.iterations, meVPerV: Array.from(r.meVPerV) });
  });
  const last = values[values.length - 1];
  const err = new Float64Array(last.length);
  for (let k = 0; k < last.length; k++) {
    const series = values.map((v) => v[k]);
    const site = Math.floor(k / m);
    const r = richardson(s, series, leverTheoreticalRate(order, point[site] === 1, hasEdges, edgeExponent));
    // a lever arm the same on every mesh (a linear potential, reproduced exactly) has no bar to give;
    // a centre value adds the mean-value bound 1000 · tail meV/V (0 ≤ φ_g ≤ 1, mean-value.ts)
    err[k] = (Number.isFinite(r.error) ? r.error : Infinity) + (point[site] ? 1000 * tail[site] : 0);
  }
  sites.forEach((site, i) => {
    let e = 0;
    let de = 0;
    for (let g = 0; g < m; g++) {
      const k = i * m + g;
      result.leverArms.push({ site: site.id, electrode: electrodes[g].name, meVPerV: last[k], errorMeVPerV: err[k] });
      e += (last[k] / 1000) * electrodes[g].voltageV;
      de += (err[k] / 1000) * Math.abs(electrodes[g].voltageV);
    }
    result.siteEnergies.push({ id: site.id, eV: e, errorEv: de });
  });
  if (meshes.length < Math.max(2, Math.floor(opts.levels ?? 3))) result.notes.push(`The coarsest lever-arm levels coincided with the initial grid between the device's planes: ${meshes.length} distinct nested meshes were used.`);
  if (meshes.length < 3) result.notes.push('Only two nested meshes were used for the lever arms: their error bars use the theoretical rate with a safety factor of 3.');
  opts.onProgress?.({ phase: 'done', fraction: 1 });
  return result;
}
