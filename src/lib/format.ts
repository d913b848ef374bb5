// Numbers, limits, shares, p-values and dates as every page, chart and table writes them. One
// convention: an em dash '—' for a value that is missing (the en dash '–' joins a range), and
// one-sided limits in words ("at most 0.080"), which read the same aloud as on screen.
import { MEASUREMENT_INFO, UNIT_LABEL, type Measurement } from './measurements';

/** What a cell shows for a missing value. */
export const MISSING = '—';

const int = new Intl.NumberFormat('en-US');

/** A count with thousands separators, e.g. "12,345". */
export const count = (n: number) => int.format(n);
export const fmtCount = count;

export function unitOf(m: Measurement): string {
	return UNIT_LABEL[MEASUREMENT_INFO[m].unit];
}
/** Axis label: "Stem-to-guide clearance (mm)". */
export function axisLabel(m: Measurement): string {
	return `${MEASUREMENT_INFO[m].label} (${unitOf(m)})`;
}

/** A value in the measurement's canonical unit, with its usual decimals (`extra` more for summaries). */
export function fmtValue(m: Measurement, x: number | null | undefined, extra = 0): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return MISSING;
	return x.toFixed(MEASUREMENT_INFO[m].decimals + extra);
}
/** The same with the unit: "0.052 mm". */
export function fmtWithUnit(m: Measurement, x: number | null | undefined, extra = 0): string {
	const s = fmtValue(m, x, extra);
	return s === MISSING ? s : `${s} ${unitOf(m)}`;
}

/** Limits: "0.020 – 0.080", "at most 0.080", "at least 1.00" or "none set"; `withUnit` adds " mm". */
export function fmtLimits(m: Measurement, limits: { min: number | null; max: number | null } | null | undefined, withUnit = false): string {
	const min = limits?.min ?? null;
	const max = limits?.max ?? null;
	const unit = withUnit ? ` ${unitOf(m)}` : '';
	if (min !== null && max !== null) return `${fmtValue(m, min)} – ${fmtValue(m, max)}${unit}`;
	if (max !== null) return `at most ${fmtValue(m, max)}${unit}`;
	if (min !== null) return `at least ${fmtValue(m, min)}${unit}`;
	return 'none set';
}

/** A share as a percentage, e.g. 0.1234 → "12.3 %". */
export function fmtPct(x: number | null | undefined, decimals = 1): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return MISSING;
	return `${(x * 100).toFixed(decimals)} %`;
}

/** An ISO timestamp as "2026-01-31 14:05" (UTC). */
export function stamp(iso: string): string {
	return `${iso.slice(0, 10)} ${iso.slice(11, 16)}`;
}

/** A p-value as printed: "p = 0.031", "p < 0.001". */
export function pValue(p: number | null): string {
	if (p === null) return 'p not defined';
	if (p < 0.001) return 'p < 0.001';
	return `p = ${p < 0.1 ? p.toFixed(3) : p.toFixed(2)}`;
}

/**
 * What a two-sided p-value says, in words: how often a difference at least this large would
 * turn up by chance if both groups really failed equally often.
 */
export function pValueWords(p: number | null): string {
	if (p === null) return 'There are too few positions to test the difference.';
	const chance = p < 0.001 ? 'fewer than 1 in 1,000' : p < 0.01 ? `about ${Math.max(1, Math.round(p * 1000))} in 1,000` : `about ${Math.round(p * 100)} in 100`;
	const verdict = p < 0.01 ? 'a real difference' : p < 0.05 ? 'probably a real difference' : 'not clearly different: chance alone could explain it';
	return `If both sides failed equally often, a difference at least this large would turn up in ${chance} samples like this one — ${verdict}.`;
}

export const TEST_NAME = { fisher: 'Fisher’s exact test (two-sided)', chi_square: 'Pearson’s chi-square test (1 degree of freedom)' } as const;

/** A capability index to 2 decimals ("1.24"). */
export function fmtIndex(x: number | null | undefined): string {
	return x === null || x === undefined || !Number.isFinite(x) ? MISSING : x.toFixed(2);
}

/** An interval of two indices, "1.20–1.28". */
export function fmtIndexInterval(ci: { lower: number; upper: number } | null | undefined): string {
	return ci ? `${fmtIndex(ci.lower)}–${fmtIndex(ci.upper)}` : MISSING;
}

/** A share that may be tiny, with the decimals it needs: "2.4 %", "0.04 %", "0.001 %", "< 0.001 %", "0 %". */
export function fmtShare(x: number | null | undefined): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return MISSING;
	if (x === 0) return '0 %';
	if (x < 0.00001) return '< 0.001 %';
	return fmtPct(x, x < 0.0001 ? 3 : x < 0.001 ? 2 : 1);
}
