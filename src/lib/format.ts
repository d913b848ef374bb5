// Numbers and dates as the analytics pages show them.
import { MEASUREMENT_INFO, UNIT_LABEL, type Measurement } from './measurements';

const int = new Intl.NumberFormat('en-US');

export const count = (n: number) => int.format(n);

/** A value of a measurement in its canonical unit, with the unit, at the measurement's decimals. */
export function measured(m: Measurement, value: number | null | undefined, withUnit = true): string {
	if (value === null || value === undefined) return '—';
	const info = MEASUREMENT_INFO[m];
	const text = value.toFixed(info.decimals);
	return withUnit ? `${text} ${UNIT_LABEL[info.unit]}` : text;
}

/** A share as a percentage, e.g. 0.1234 → "12.3 %". */
export function percent(x: number | null | undefined, digits = 1): string {
	return x === null || x === undefined ? '—' : `${(x * 100).toFixed(digits)} %`;
}

/** An ISO timestamp as "2026-01-31 14:05" (UTC). */
export function stamp(iso: string): string {
	return `${iso.slice(0, 10)} ${iso.slice(11, 16)}`;
}

/** A limit pair, e.g. "0.020–0.080 mm", "≤ 0.080 mm", or "none". */
export function limitRange(m: Measurement, l: { min: number | null; max: number | null } | null): string {
	if (!l || (l.min === null && l.max === null)) return 'none';
	if (l.min !== null && l.max !== null) return `${measured(m, l.min, false)}–${measured(m, l.max)}`;
	return l.max !== null ? `≤ ${measured(m, l.max)}` : `≥ ${measured(m, l.min)}`;
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
