/** The studio's live far-field check: the hook (worker-backed) and its panel. */
export { useFarField } from './useFarField';
export type { FarFieldState } from './useFarField';
export { FarFieldPanel } from './FarFieldPanel';
export type { FarFieldPanelProps } from './FarFieldPanel';
export { diffDesign } from './diffDesign';
