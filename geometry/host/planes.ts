/**
 * From a design's layers and electrodes to one planar stack: electrodes spanning the domain's
 * x–y cross-section are metal planes (conducting half-spaces beyond their face nearest the
 * sites, issue 11); other electrodes are gates or leads of finite size, which only the FEM treats.
 *
 *        ┌──────────── domain ────────────┐
 *     ███████████████████████████████████████   spans x and y → metal plane above (z > its minNm z)
 *              ▆▆▆▆                              a gate: `electrode-not-plane`
 *        ·  ·  ·  ·  ·  sites
 *     ███████████████████████████████████████   spans → metal plane below (z < its maxNm z)
 */
import type { Vec3 } from '../design/types';
import { homogeneousStack, planarStack, type MetalPlane } from './stack';
import type { Electrode, HostFinding, HostLayer, PlanarStack } from './types';

export interface PlaneOfElectrode extends MetalPlane {
  /** index of the electrode in the design's list */
  electrode: number;
}

/** Electrodes that span the domain's cross-section, as metal planes on the far side of the sites. */
export function metalPlanes(
  electrodes: readonly Electrode[],
  domain: { center: Vec3; halfExtentsNm: Vec3 } | undefined,
  siteZ: ArrayLike<number>,
): { planes: PlaneOfElectrode[]; findings: HostFinding[] } {
  const findings: HostFinding[] = [];
  const planes: PlaneOfElectrode[] = [];
  if (electrodes.length === 0) return { planes, findings };
  if (!domain) return { planes, findings: [{ code: 'no-domain' }] };
  let zLo = Infinity;
  let zHi = -Infinity;
  for (let i = 0; i < siteZ.length; i++) {
    zLo = Math.min(zLo, siteZ[i]);
    zHi = Math.max(zHi, siteZ[i]);
  }
  electrodes.forEach((e, index) => {
    let spans = true;
    for (let k = 0; k < 2; k++) {
      if (e.minNm[k] > domain.center[k] - domain.halfExtentsNm[k] || e.maxNm[k] < domain.center[k] + domain.halfExtentsNm[k]) spans = false;
    }
    if (!spans) {
      findings.push({ code: 'electrode-not-plane', index });
      return;
    }
    if (e.minNm[2] > zHi) planes.push({ name: e.name, side: 'above', zNm: e.minNm[2], electrode: index });
    else if (e.maxNm[2] < zLo) planes.push({ name: e.name, side: 'below', zNm: e.maxNm[2], electrode: index });
    else findings.push({ code: 'electrode-straddles', index });
  });
  return { planes, findings };
}

export interface HostStackInput {
  /** εr of the host when there are no layers (host.epsilonR) */
  epsilonR: number;
  layers?: readonly HostLayer[];
  electrodes?: readonly Electrode[];
  domain?: { center: Vec3; halfExtentsNm: Vec3 };
}

/** The stack of a design: its layers (or the homogeneous host) closed by the metal planes among its electrodes. */
export function hostStack(
  input: HostStackInput,
  siteZ: ArrayLike<number>,
): { stack: PlanarStack | null; planes: PlaneOfElectrode[]; findings: HostFinding[] } {
  const { planes, findings } = metalPlanes(input.electrodes ?? [], input.domain, siteZ);
  if (input.layers && input.layers.length > 0) {
    const built = planarStack(input.layers, planes);
    return { stack: built.stack, planes, findings: [...findings, ...built.findings] };
  }
  const built = planarStack([{ name: 'host', epsilonR: input.epsilonR, zMinNm: null, zMaxNm: null }], planes);
  return { stack: built.stack ?? homogeneousStack(input.epsilonR), planes, findings };
}
