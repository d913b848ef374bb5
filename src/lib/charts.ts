// Lapmark's chart palette and number formats, shared by every chart and its table view.
// Intake and exhaust keep the same two colours everywhere (print included): Okabe & Ito's
// blue and vermillion, told apart with the common colour-vision deficiencies. The same values
// are CSS variables in app.css (--color-intake, --color-exhaust).
import { MEASUREMENT_INFO, UNIT_LABEL, type Measurement, type Side, type Stage } from './measurements';
import { count } from './format';

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

export function unitOf(m: Measurement): string {
	return UNIT_LABEL[MEASUREMENT_INFO[m].unit];
}
/** Axis label: "Stem-to-guide clearance (mm)". */
export function axisLabel(m: Measurement): string {
	return `${MEASUREMENT_INFO[m].label} (${unitOf(m)})`;
}
/** A value in the measurement's canonical unit, with its usual decimals (one more for summaries). */
export function fmtValue(m: Measurement, x: number | null | undefined, extra = 0): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return '–';
	return x.toFixed(MEASUREMENT_INFO[m].decimals + extra);
}
export function fmtWithUnit(m: Measurement, x: number | null | undefined, extra = 0): string {
	const s = fmtValue(m, x, extra);
	return s === '–' ? s : `${s} ${unitOf(m)}`;
}
/** Limits as a table cell: "0.020 – 0.080", "at most 0.080", "at least 1.00" or "none set". */
export function fmtLimits(m: Measurement, limits: { min: number | null; max: number | null } | null | undefined): string {
	const min = limits?.min ?? null;
	const max = limits?.max ?? null;
	if (min !== null && max !== null) return `${fmtValue(m, min)} – ${fmtValue(m, max)}`;
	if (max !== null) return `at most ${fmtValue(m, max)}`;
	if (min !== null) return `at least ${fmtValue(m, min)}`;
	return 'none set';
}
export function fmtPct(x: number | null | undefined, decimals = 1): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return '–';
	return `${(x * 100).toFixed(decimals)} %`;
}
/** Counts as $lib/format writes them ("12,345"); p-values: `pValue` there. */
export const fmtCount = count;
