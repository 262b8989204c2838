/**
 * The layered host (issue 11): closed forms for a planar stack along z and metal planes, for the
 * layered far field, the reaction-field split, gate lever arms and `check`'s image-charge figure.
 *
 *   interface.ts  one interface: Jackson's image and transmitted charges (§4.4), metal as ε → ∞
 *   stack.ts      layers (+ metal planes) → flat interfaces and permittivities; region lookup
 *   images.ts     G(r, r₀) of a stack with ≤ 2 interfaces between metals as a truncated image
 *                 series with a rigorous tail bound (two half-spaces exact, slab, plates)
 *   reaction.ts   U and V of spherical densities from the images (eV), with the leaked share
 *   plates.ts     two metal planes with dielectrics between: series capacitor, lever arms (meV/V)
 *   planes.ts     a design's layers and electrodes → one stack (spanning electrodes become planes)
 *   lever.ts      lever-arm matrix (sites × electrodes, meV/V) and site energies for plane electrodes
 *   effect.ts     the worst image-charge effect on U and V against an infinite host
 */
export type { Electrode, HostCode, HostFinding, HostLayer, PlanarStack } from './types';
export { interfaceCharges } from './interface';
export { planarStack, type MetalPlane } from './stack';
export { hostStack, type HostStackInput } from './planes';
export { greenFunction, imageSeries, reactionAt, seriesAt, type ImageOptions, type ImageSeries } from './images';
export { layeredEnergy, type DensitySite, type LayeredEnergy } from './reaction';
export { plateLeverArms, plateProfile, plateSiteEnergy, type Carrier, type PlateProfile } from './plates';
export { planeLeverArms, type LeverArmInput, type LeverArms } from './lever';
export { imageChargeEffect, type ImageEffect, type ImageEffectInput } from './effect';
