/**
 * The request each start button of "Server runs" sends, for the element order picked (P1 or P2) and the adaptive
 * switch, which only the U and V solve takes (the server refuses `adaptive` on other kinds).
 */
import type { JobCreateBody } from '@contracts/api';

export function actionBodies(order: 1 | 2, adaptive: boolean): { label: string; body: JobCreateBody }[] {
  return [
    { label: 'Build mesh', body: { kind: 'mesh', options: { order } } },
    { label: 'Solve U and V', body: { kind: 'coulomb', options: { order, adaptive } } },
    { label: 'Refinement sweep', body: { kind: 'convergence', options: { order, sweep: 'refinement' } } },
    { label: 'Box sweep', body: { kind: 'convergence', options: { order, sweep: 'box' } } },
  ];
}
