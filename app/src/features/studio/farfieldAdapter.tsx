/**
 * The seam to the far-field branch's panel and worker hook (app/src/features/studio/farfield/):
 *   useFarField(document) → { report, computing, error, … }   (Web Worker, design resident)
 *   <FarFieldPanel report computing error document readOnly onApplyRecommended />
 * The workspace imports them only through this file.
 */
export { FarFieldPanel, useFarField } from './farfield';
