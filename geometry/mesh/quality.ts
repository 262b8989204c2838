/**
 * Element quality and the mesh quality report.
 *
 * Shape measures (all scale-free, 1 for the regular tetrahedron, → 0 for a flat one):
 *  - radius ratio ρ = 3·r_in / R_circ (standard; e.g. Liu & Joe, BIT 34 (1994) 268–287).
 *      r_in = 3V / S (S = total face area);
 *      R_circ from the opposite-edge products (Crelle's formula, 1821):
 *        24·V·R = sqrt((aA+bB+cC)(aA+bB−cC)(aA−bB+cC)(−aA+bB+cC)),
 *      a/A, b/B, c/C the lengths of the three pairs of opposite edges.
 *  - mean ratio η = 12·(3V)^(2/3) / Σ l_ij²  (Liu & Joe 1994, same paper: the mean ratio of the
 *      eigenvalues of SᵀS for the map S from the regular tet; this closed form follows from it).
 *  - dihedral angles: the angle between the two faces meeting at an edge is π minus the angle
 *      between their outward normals.
 *
 *            v3                  edge (k,l) is shared by the faces opposite the OTHER two
 *           /|\                  vertices i, j:  dihedral(k,l) = π − ∠(n_i, n_j)
 *          / | \
 *        v0--|--v2                e.g. edge v0–v1 lies on faces f2 (opp. v2) and f3 (opp. v3)
 *          \ | /
 *           \|/
 *            v1
 *
 * Kuhn/Maubach bisection meshes have only a few shapes (a bounded number of similarity classes),
 * so these numbers are also a cheap regression check on the mesher.
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import type { TetMesh } from './types';
import { TET_EDGES, TET_FACES } from '../fem/reference';
import { buildEdges, buildFaces, type EdgeTable, type FaceTable } from './edges';
import { NeumaierSum, tetDet } from './check';

export interface TetQuality {
  /** mean ratio η per tet (Liu & Joe 1994), in [0, 1] */
  meanRatio: Float64Array;
  /** radius ratio 3·r_in/R_circ per tet, in [0, 1] */
  radiusRatio: Float64Array;
  /** smallest and largest dihedral angle per tet, degrees */
  minDihedralDeg: Float64Array;
  maxDihedralDeg: Float64Array;
  /** longest edge per tet, nm (the element size used by the size field) */
  longestEdge: Float64Array;
}

/**
 * For reference edge e = (k, l), the two local faces containing it: those opposite the two
 * vertices not on the edge.
 */
const EDGE_FACES: ReadonlyArray<readonly [number, number]> = TET_EDGES.map(([k, l]) => {
  const other = [0, 1, 2, 3].filter((v) => v !== k && v !== l);
  return [other[0], other[1]] as const;
});

const RAD2DEG = 180 / Math.PI;

/** Copies the 4 vertex positions of tet t into p (12 entries: x, y, z per local vertex). */
function gatherVertices(coords: Float64Array, tets: Uint32Array, t: number, p: Float64Array): void {
  for (let i = 0; i < 4; i++) {
    const v = 3 * tets[4 * t + i];
    p[3 * i] = coords[v];
    p[3 * i + 1] = coords[v + 1];
    p[3 * i + 2] = coords[v + 2];
  }
}

/**
 * Mean ratio from volume V and the sum of squared edge lengths: 1 for the regular tet, 0 for
 * a flat or inverted one. One function for both callers, so their values agree to the bit.
 */
function meanRatioOf(V: number, sumL2: number): number {
  return V > 0 ? (12 * Math.cbrt(3 * V) ** 2) / sumL2 : 0;
}

/** Per-tet shape measures in one pass over the mesh (no per-tet allocation). */
export function computeTetQuality(mesh: Pick<TetMesh, 'coords' | 'tets'>): TetQuality {
  const { coords, tets } = mesh;
  const m = tets.length >> 2;
  const meanRatio = new Float64Array(m);
  const radiusRatio = new Float64Array(m);
  const minDihedralDeg = new Float64Array(m);
  const maxDihedralDeg = new Float64Array(m);
  const longestEdge = new Float64Array(m);
  const p = new Float64Array(12); // the 4 vertex positions
  const n = new Float64Array(12); // the 4 outward face normals (length = 2·face area)
  const nl = new Float64Array(4);
  const l2 = new Float64Array(6);
  const e0 = Int8Array.from(TET_EDGES.map((e) => e[0]));
  const e1 = Int8Array.from(TET_EDGES.map((e) => e[1]));
  const fa = Int8Array.from(TET_FACES.map((f) => f[0]));
  const fb = Int8Array.from(TET_FACES.map((f) => f[1]));
  const fc = Int8Array.from(TET_FACES.map((f) => f[2]));
  const ef0 = Int8Array.from(EDGE_FACES.map((f) => f[0]));
  const ef1 = Int8Array.from(EDGE_FACES.map((f) => f[1]));
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    gatherVertices(coords, tets, t, p);
    let sumL2 = 0;
    let maxL2 = 0;
    for (let e = 0; e < 6; e++) {
      const a = 3 * e0[e];
      const b = 3 * e1[e];
      const d = (p[a] - p[b]) ** 2 + (p[a + 1] - p[b + 1]) ** 2 + (p[a + 2] - p[b + 2]) ** 2;
      l2[e] = d;
      sumL2 += d;
      if (d > maxL2) maxL2 = d;
    }
    let areaSum2 = 0; // Σ |n_i| = 2·S
    for (let f = 0; f < 4; f++) {
      const a = 3 * fa[f];
      const b = 3 * fb[f];
      const c = 3 * fc[f];
      const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
      const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
      const nx = uy * vz - uz * vy;
      const ny = uz * vx - ux * vz;
      const nz = ux * vy - uy * vx;
      n[3 * f] = nx;
      n[3 * f + 1] = ny;
      n[3 * f + 2] = nz;
      nl[f] = Math.sqrt(nx * nx + ny * ny + nz * nz);
      areaSum2 += nl[f];
    }
    const det = tetDet(coords, tets, t); // 6V
    let dmin = 180;
    let dmax = 0;
    for (let e = 0; e < 6; e++) {
      const i = 3 * ef0[e];
      const j = 3 * ef1[e];
      let c = -(n[i] * n[j] + n[i + 1] * n[j + 1] + n[i + 2] * n[j + 2]) / (nl[ef0[e]] * nl[ef1[e]]);
      c = c > 1 ? 1 : c < -1 ? -1 : c;
      const ang = Math.acos(c) * RAD2DEG;
      if (ang < dmin) dmin = ang;
      if (ang > dmax) dmax = ang;
    }
    // opposite edge pairs in TET_EDGES order: e0=(0,1)↔e5=(2,3), e2=(0,2)↔e4=(1,3), e3=(0,3)↔e1=(1,2)
    const aA = Math.sqrt(l2[0] * l2[5]);
    const bB = Math.sqrt(l2[2] * l2[4]);
    const cC = Math.sqrt(l2[3] * l2[1]);
    const prod = (aA + bB + cC) * (aA + bB - cC) * (aA - bB + cC) * (-aA + bB + cC);
    const V = det / 6;
    const rCirc = Math.sqrt(Math.max(prod, 0)) / (24 * V);
    const rIn = det / areaSum2; // 3V/S = (det/2)/(areaSum2/2)
    radiusRatio[t] = V > 0 ? (3 * rIn) / rCirc : 0;
    meanRatio[t] = meanRatioOf(V, sumL2);
    minDihedralDeg[t] = dmin;
    maxDihedralDeg[t] = dmax;
    longestEdge[t] = Math.sqrt(maxL2);
  }
  return { meanRatio, radiusRatio, minDihedralDeg, maxDihedralDeg, longestEdge };
}

/**
 * Mean ratio only (the CellData quality of the exporters): the same formula and operation order as
 * computeTetQuality, hence identical values, without the angle and radius work.
 */
export function computeMeanRatio(mesh: Pick<TetMesh, 'coords' | 'tets'>): Float64Array {
  const { coords, tets } = mesh;
  const m = tets.length >> 2;
  const out = new Float64Array(m);
  const p = new Float64Array(12);
  const e0 = Int8Array.from(TET_EDGES.map((e) => e[0]));
  const e1 = Int8Array.from(TET_EDGES.map((e) => e[1]));
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    gatherVertices(coords, tets, t, p);
    let sumL2 = 0;
    for (let e = 0; e < 6; e++) {
      const a = 3 * e0[e];
      const b = 3 * e1[e];
      sumL2 += (p[a] - p[b]) ** 2 + (p[a + 1] - p[b + 1]) ** 2 + (p[a + 2] - p[b + 2]) ** 2;
    }
    out[t] = meanRatioOf(tetDet(coords, tets, t) / 6, sumL2);
  }
  return out;
}

/** A charge site for the report: position in nm and optionally its orbital radius. */
export interface ReportSite {
  id?: string;
  position: readonly [number, number, number];
  /** orbital radius a (nm); when given, "near the site" means within this distance */
  radiusNm?: number;
}

export interface Histogram {
  /** bin edges, length bins+1 */
  edges: number[];
  counts: number[];
}

export interface SizeBin {
  /** geometric centre of the distance bin, nm */
  r: number;
  rLo: number;
  rHi: number;
  count: number;
  /** longest edge of the tets in the bin: min / mean / max, nm */
  hMin: number;
  hMean: number;
  hMax: number;
}

export interface SiteReport {
  id: string;
  position: [number, number, number];
  /** distance within which "near" was taken, nm */
  nearRadiusNm: number;
  /** tets whose centroid lies within nearRadiusNm */
  nearTets: number;
  /** longest edge of the tet whose centroid is nearest the site, nm */
  hAtSite: number;
  /** smallest and largest element (longest edge) near the site, nm */
  hMinNear: number;
  hMaxNear: number;
  /** element size against distance, log-spaced bins, over the tets nearer this site than any other */
  sizeVsDistance: SizeBin[];
}

export interface QualityReport {
  vertices: number;
  edges: number;
  faces: number;
  tets: number;
  p2Nodes: number;
  volumeNm3: number;
  minDihedralDeg: number;
  maxDihedralDeg: number;
  radiusRatio: { min: number; mean: number; histogram: Histogram };
  meanRatio: { min: number; mean: number; histogram: Histogram };
  dihedralHistogramDeg: Histogram;
  /** tets per refinement level: levels[k] = count of tets with tetLevel k */
  levels: number[];
  /** smallest and largest longest-edge over the whole mesh, nm */
  hMin: number;
  hMax: number;
  sites: SiteReport[];
}

export interface QualityOptions {
  edgeTable?: EdgeTable;
  faceTable?: FaceTable;
  tetQuality?: TetQuality;
  /** bins of the [0,1] shape-measure histograms (default 20) */
  shapeBins?: number;
  /** log-spaced distance bins per site (default 24) */
  distanceBins?: number;
  /**
   * Default "near" radius when a site has no radiusNm: this many times the longest edge of the
   * element at the site (default 3: the element itself and about two layers around it).
   */
  nearFactor?: number;
}

function histogram(values: Float64Array, lo: number, hi: number, bins: number): Histogram {
  const counts = new Array<number>(bins).fill(0);
  const w = (hi - lo) / bins;
  for (let i = 0; i < values.length; i++) {
    let b = Math.floor((values[i] - lo) / w);
    if (b < 0) b = 0;
    if (b >= bins) b = bins - 1;
    counts[b]++;
  }
  const edges = Array.from({ length: bins + 1 }, (_, i) => lo + i * w);
  return { edges, counts };
}

function minMean(values: Float64Array): { min: number; mean: number } {
  let min = Infinity;
  const s = new NeumaierSum();
  for (let i = 0; i < values.length; i++) {
    if (values[i] < min) min = values[i];
    s.add(values[i]);
  }
  return { min: values.length ? min : NaN, mean: values.length ? s.value / values.length : NaN };
}

/**
 * The quality report of a mesh. With sites, each tet is attributed to its nearest site
 * (ties to the lower site index) for the size-against-distance curves, so that with several
 * sites each curve shows the grading around its own site; cost O(tets × sites).
 */
export function qualityReport(mesh: TetMesh, sites: ReportSite[] = [], options: QualityOptions = {}): QualityReport {
  const { coords, tets } = mesh;
  const nV = coords.length / 3;
  const m = tets.length >> 2;
  const et = options.edgeTable ?? buildEdges(tets, nV);
  const ft = options.faceTable ?? buildFaces(tets, nV);
  const q = options.tetQuality ?? computeTetQuality(mesh);
  const shapeBins = options.shapeBins ?? 20;
  const nEdges = et.edges.length / 2;

  let minD = Infinity;
  let maxD = -Infinity;
  let hMin = Infinity;
  let hMax = -Infinity;
  const vol = new NeumaierSum();
  const dihedrals = new Float64Array(2 * m);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    if (q.minDihedralDeg[t] < minD) minD = q.minDihedralDeg[t];
    if (q.maxDihedralDeg[t] > maxD) maxD = q.maxDihedralDeg[t];
    if (q.longestEdge[t] < hMin) hMin = q.longestEdge[t];
    if (q.longestEdge[t] > hMax) hMax = q.longestEdge[t];
    dihedrals[2 * t] = q.minDihedralDeg[t];
    dihedrals[2 * t + 1] = q.maxDihedralDeg[t];
    vol.add(tetDet(coords, tets, t) / 6);
  }
  const levels: number[] = [];
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const l = mesh.tetLevel ? mesh.tetLevel[t] : 0;
    while (levels.length <= l) levels.push(0);
    levels[l]++;
  }

  return {
    vertices: nV,
    edges: nEdges,
    faces: ft.faces.length / 3,
    tets: m,
    p2Nodes: nV + nEdges,
    volumeNm3: vol.value,
    minDihedralDeg: m ? minD : NaN,
    maxDihedralDeg: m ? maxD : NaN,
    radiusRatio: { ...minMean(q.radiusRatio), histogram: histogram(q.radiusRatio, 0, 1, shapeBins) },
    meanRatio: { ...minMean(q.meanRatio), histogram: histogram(q.meanRatio, 0, 1, shapeBins) },
    // the per-tet min and max dihedral angles, in 10° bins over [0°, 180°]
    dihedralHistogramDeg: histogram(dihedrals, 0, 180, 18),
    levels,
    hMin: m ? hMin : NaN,
    hMax: m ? hMax : NaN,
    sites: sites.length ? siteReports(mesh, sites, q.longestEdge, options) : [],
  };
}

function siteReports(mesh: TetMesh, sites: ReportSite[], h: Float64Array, options: QualityOptions): SiteReport[] {
  const { coords, tets } = mesh;
  const m = tets.length >> 2;
  const S = sites.length;
  const nBins = options.distanceBins ?? 24;
  const nearFactor = options.nearFactor ?? 3;
  const sx = new Float64Array(S);
  const sy = new Float64Array(S);
  const sz = new Float64Array(S);
  sites.forEach((s, k) => {
    sx[k] = s.position[0];
    sy[k] = s.position[1];
    sz[k] = s.position[2];
  });
  // centroids, nearest site of each tet and its distance
  const cen = new Float64Array(3 * m);
  const owner = new Uint32Array(m);
  const dist = new Float64Array(m);
  const nearestTet = new Int32Array(S).fill(-1);
  const nearestDist = new Float64Array(S).fill(Infinity);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    let cx = 0, cy = 0, cz = 0;
    for (let i = 0; i < 4; i++) {
      const v = 3 * tets[4 * t + i];
      cx += coords[v];
      cy += coords[v + 1];
      cz += coords[v + 2];
    }
    cx *= 0.25;
    cy *= 0.25;
    cz *= 0.25;
    cen[3 * t] = cx;
    cen[3 * t + 1] = cy;
    cen[3 * t + 2] = cz;
    let best = Infinity;
    let bestK = 0;
    for (let k = 0; k < S; k++) {
      const d = Math.hypot(cx - sx[k], cy - sy[k], cz - sz[k]);
      if (d < best) {
        best = d;
        bestK = k;
      }
      if (d < nearestDist[k]) {
        nearestDist[k] = d;
        nearestTet[k] = t;
      }
    }
    owner[t] = bestK;
    dist[t] = best;
  }
  return sites.map((site, k) => {
    const hAtSite = nearestTet[k] >= 0 ? h[nearestTet[k]] : NaN;
    const nearR = site.radiusNm ?? nearFactor * hAtSite;
    let nearTets = 0;
    let hMinNear = Infinity;
    let hMaxNear = -Infinity;
    let rMin = Infinity;
    let rMax = 0;
    for (let t = 0; t < m; t++) {
      if ((t & COOPERATE_MASK) === 0) cooperate();
      const d = Math.hypot(cen[3 * t] - sx[k], cen[3 * t + 1] - sy[k], cen[3 * t + 2] - sz[k]);
      if (d <= nearR) {
        nearTets++;
        if (h[t] < hMinNear) hMinNear = h[t];
        if (h[t] > hMaxNear) hMaxNear = h[t];
      }
      if (owner[t] === k) {
        if (dist[t] > 0 && dist[t] < rMin) rMin = dist[t];
        if (dist[t] > rMax) rMax = dist[t];
      }
    }
    const bins: SizeBin[] = [];
    if (rMax > 0 && rMin < Infinity) {
      const lo = Math.log(rMin);
      const span = Math.log(rMax) - lo || 1;
      const cnt = new Float64Array(nBins);
      const sum = new Float64Array(nBins);
      const mn = new Float64Array(nBins).fill(Infinity);
      const mx = new Float64Array(nBins).fill(-Infinity);
      for (let t = 0; t < m; t++) {
        if ((t & COOPERATE_MASK) === 0) cooperate();
        if (owner[t] !== k) continue;
        const r = Math.max(dist[t], rMin);
        let b = Math.floor(((Math.log(r) - lo) / span) * nBins);
        if (b >= nBins) b = nBins - 1;
        if (b < 0) b = 0;
        cnt[b]++;
        sum[b] += h[t];
        if (h[t] < mn[b]) mn[b] = h[t];
        if (h[t] > mx[b]) mx[b] = h[t];
      }
      for (let b = 0; b < nBins; b++) {
        if (!cnt[b]) continue;
        const rLo = Math.exp(lo + (span * b) / nBins);
        const rHi = Math.exp(lo + (span * (b + 1)) / nBins);
        bins.push({ r: Math.sqrt(rLo * rHi), rLo, rHi, count: cnt[b], hMin: mn[b], hMean: sum[b] / cnt[b], hMax: mx[b] });
      }
    }
    return {
      id: site.id ?? `site-${k}`,
      position: [sx[k], sy[k], sz[k]] as [number, number, number],
      nearRadiusNm: nearR,
      nearTets,
      hAtSite,
      hMinNear: nearTets ? hMinNear : NaN,
      hMaxNear: nearTets ? hMaxNear : NaN,
      sizeVsDistance: bins,
    };
  });
}
