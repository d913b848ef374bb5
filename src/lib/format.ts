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
