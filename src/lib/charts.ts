// Lapmark's chart palette and labels, shared by every chart and its table view (number formats:
// $lib/format).
// Intake and exhaust keep the same two colours everywhere (print included): Okabe & Ito's
// blue and vermillion, told apart with the common colour-vision deficiencies. The same values
// are CSS variables in app.css (--color-intake, --color-exhaust).
import type { Side, Stage } from './measurements';

export const SIDE_COLOUR: Record<Side, string> = { intake: '#0072b2', exhaust: '#d55e00' };
/** Stages: as-received light, final dark, in one hue (told apart by lightness, also in grey print). */
export const STAGE_COLOUR: Record<Stage, string> = { as_received: '#7a8c96', final: '#0f4c5c' };
/** Limit lines: a dashed reddish purple (Okabe & Ito), distinct from both sides. */
export const LIMIT_COLOUR = '#cc79a7';
/** A value being checked, marked on a distribution (near-black: stands out on either side's colour). */
export const MARK_COLOUR = '#222222';
/** Heat map ramp, light to dark, one hue (readable in grey). */
export const RAMP = ['#f4f1ea', '#f3d9b1', '#eab26e', '#d98336', '#b3541e', '#7a2e0e'];

export const SIDE_LABEL: Record<Side, string> = { intake: 'Intake', exhaust: 'Exhaust' };
export const STAGE_SHORT: Record<Stage, string> = { as_received: 'As received', final: 'Final' };
