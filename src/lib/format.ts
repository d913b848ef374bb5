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

/** The smallest p-value an answer gives as computed (the API's bound, `pBelow`). */
export const P_BOUND = 1e-15;

/**
 * A p-value as printed, never "p = 0": "p = 0.31", "p = 0.031", "p = 4.0e-4" (the computed
 * value), or "p < 1e-15" when the answer gives only that bound (`below`).
 */
export function pValue(p: number | null, below = false): string {
	if (p === null) return 'p not defined';
	if (below) return `p < ${P_BOUND.toExponential(0)}`;
	if (p < 0.001) return `p = ${p.toExponential(1)}`;
	return `p = ${p < 0.1 ? p.toFixed(3) : p.toFixed(2)}`;
}

/** A minus sign for figures (U+2212), not a hyphen. */
const signed = (x: number, decimals: number) => {
	const s = Math.abs(x).toFixed(decimals);
	return Number(s) === 0 ? s : `${x < 0 ? '−' : '+'}${s}`;
};

/** A difference of two shares (fractions) in percentage points: 0.068 → "+6.8 points". */
export function fmtPoints(x: number | null | undefined, decimals = 1): string {
	if (x === null || x === undefined || !Number.isFinite(x)) return MISSING;
	return `${signed(x * 100, decimals)} points`;
}

const SHORT_DAY = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: '2-digit', timeZone: 'UTC' });
const MONTH = new Intl.DateTimeFormat('en-GB', { month: 'short', year: 'numeric', timeZone: 'UTC' });

/** A day on a time axis, e.g. "3 Mar 26" (UTC). */
export function fmtAxisDay(d: Date | number): string {
	return SHORT_DAY.format(d);
}

/** A month "2026-03" (or a date in it) as "Mar 2026". */
export function fmtMonth(m: string | Date | number): string {
	return MONTH.format(typeof m === 'string' ? new Date(`${m.slice(0, 7)}-01T00:00:00Z`) : m);
}

/** An interval of a difference in percentage points: "−9.9 to −0.3 points". */
export function fmtPointsRange(low: number | null | undefined, high: number | null | undefined, decimals = 1): string {
	if (low === null || low === undefined || high === null || high === undefined || !Number.isFinite(low) || !Number.isFinite(high)) return MISSING;
	return `${signed(low * 100, decimals)} to ${signed(high * 100, decimals)} points`;
}

/** The test a difference of two shares is given with (the API's `method`). */
export const DIFFERENCE_TEST = 'Miettinen–Nurminen score test (two-sided), interval by inverting the same test';

/** What an intake-vs-exhaust difference says, from its interval (never from p alone). */
export type DifferenceLike = {
	difference: number | null;
	ci95: { low: number | null; high: number | null };
	verdict: 'intake_higher' | 'exhaust_higher' | 'not_clearly_different';
};

/**
 * The intake-vs-exhaust difference in words, `counted` saying what the share counts ("outside
 * the limits", "reused as is"): "Intake minus exhaust: +6.8 points (95 % interval 2.1 to 11.4
 * points): intake positions are reused as is more often."
 */
export function sideDifferenceWords(d: DifferenceLike, counted: string): string {
	const figures = `Intake minus exhaust: ${fmtPoints(d.difference)} (95 % interval ${fmtPointsRange(d.ci95.low, d.ci95.high)})`;
	const verdict =
		d.verdict === 'intake_higher'
			? `intake positions are ${counted} more often than exhaust positions`
			: d.verdict === 'exhaust_higher'
				? `exhaust positions are ${counted} more often than intake positions`
				: 'not clearly different (the interval includes no difference)';
	return `${figures}: ${verdict}.`;
}

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
