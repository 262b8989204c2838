/**
 * Where the bond graph draws the sites: the design's positions projected onto the plane of the two axes along which
 * the sites spread most (the axis with the smallest spread is dropped; ties keep x before y before z), scaled into a
 * drawing box with equal nm per pixel on both axes. Pure, so tests run it in Node.
 */
export interface PlanePoint {
  id: string;
  /** drawing coordinates (px) */
  x: number;
  y: number;
}

export function bondPlane(positions: readonly (readonly [number, number, number])[]): [number, number] {
  const spread = [0, 1, 2].map((k) => {
    let lo = Infinity, hi = -Infinity;
    for (const p of positions) {
      lo = Math.min(lo, p[k]);
      hi = Math.max(hi, p[k]);
    }
    return positions.length ? hi - lo : 0;
  });
  let drop = 2;
  for (const k of [1, 0]) if (spread[k] < spread[drop]) drop = k;
  const keep = [0, 1, 2].filter((k) => k !== drop);
  return [keep[0], keep[1]];
}

export function layoutSites(sites: readonly { id: string; position: readonly [number, number, number] }[], width: number, height: number, pad: number) {
  const [a, b] = bondPlane(sites.map((s) => s.position));
  const xs = sites.map((s) => s.position[a]), ys = sites.map((s) => s.position[b]);
  const x0 = Math.min(...xs), x1 = Math.max(...xs), y0 = Math.min(...ys), y1 = Math.max(...ys);
  const spanNm = Math.max(x1 - x0, y1 - y0, 1e-9);
  const pxPerNm = Math.min(width - 2 * pad, height - 2 * pad) / spanNm;
  const cx = (x0 + x1) / 2, cy = (y0 + y1) / 2;
  const points: PlanePoint[] = sites.map((s) => ({ id: s.id, x: width / 2 + (s.position[a] - cx) * pxPerNm, y: height / 2 - (s.position[b] - cy) * pxPerNm }));
  return { axes: [a, b] as [number, number], points, pxPerNm };
}
