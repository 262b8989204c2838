/**
 * A site's orbital override as typed in the site table: the model and its sizes in nm, checked
 * with the document's own `siteSchema` (radius limits included) before it reaches the store.
 * "preset" drops the override, so the site goes back to its species' default orbital.
 */
import { siteSchema } from '@contracts/design';
import type { Site } from './editorStore';

export type OrbitalChoice = 'preset' | 'hydrogenic-1s' | 'anisotropic-1s' | 'gaussian';

export interface OrbitalFields {
  /** radius (hydrogenic, anisotropic in-plane) or sigma (gaussian), nm */
  size: string;
  /** radius along [001] for the anisotropic model, nm */
  sizeZ: string;
}

export function orbitalFieldsOf(site: Site): { model: OrbitalChoice; fields: OrbitalFields } {
  const o = site.orbital;
  if (!o) return { model: 'preset', fields: { size: '', sizeZ: '' } };
  if (o.model === 'gaussian') return { model: 'gaussian', fields: { size: String(o.sigmaNm), sizeZ: '' } };
  if (o.model === 'anisotropic-1s') return { model: o.model, fields: { size: String(o.radiusNm), sizeZ: String(o.radiusZNm) } };
  return { model: o.model, fields: { size: String(o.radiusNm), sizeZ: '' } };
}

/** the new site, or a message naming the field that is wrong and the unit */
export function editOrbital(site: Site, model: OrbitalChoice, f: OrbitalFields): { site: Site } | { error: string } {
  if (model === 'preset') {
    const { orbital: _o, ...rest } = site;
    return { site: rest };
  }
  const num = (t: string) => (t.trim() === '' ? NaN : Number(t));
  const size = num(f.size);
  const sizeZ = num(f.sizeZ);
  const sizeName = model === 'gaussian' ? 'Sigma' : model === 'anisotropic-1s' ? 'In-plane radius' : 'Radius';
  if (!Number.isFinite(size)) return { error: `${sizeName} is a number in nm, e.g. 2.5.` };
  if (model === 'anisotropic-1s' && !Number.isFinite(sizeZ)) return { error: 'Radius along [001] is a number in nm, e.g. 1.4.' };
  const orbital: NonNullable<Site['orbital']> =
    model === 'gaussian' ? { model, sigmaNm: size } : model === 'anisotropic-1s' ? { model, radiusNm: size, radiusZNm: sizeZ } : { model, radiusNm: size };
  const next: Site = { ...site, orbital };
  const parsed = siteSchema.safeParse(next);
  if (!parsed.success) {
    const iss = parsed.error.issues[0];
    const key = String(iss.path.at(-1));
    const label = key === 'radiusZNm' ? 'Radius along [001]' : sizeName;
    return { error: `${label} (nm): ${plainWords(iss)}` };
  }
  return { site: next };
}

/** zod's range issues in words with the unit ("must be at least 0.0001 nm"); other issues as zod words them */
function plainWords(iss: { code: string; message: string; minimum?: unknown; maximum?: unknown; inclusive?: boolean }): string {
  if (iss.code === 'too_small' && typeof iss.minimum === 'number') return `must be ${iss.inclusive === false ? 'more than' : 'at least'} ${iss.minimum} nm.`;
  if (iss.code === 'too_big' && typeof iss.maximum === 'number') return `must be ${iss.inclusive === false ? 'less than' : 'at most'} ${iss.maximum} nm.`;
  return iss.message;
}
