// Input checks shared by the statistics modules.

/** A series of measurements: a plain array or a Float64Array. */
export type Values = readonly number[] | Float64Array;

/**
 * Copies `values` to a plain array, throwing a RangeError on NaN or ±Infinity:
 * a non-finite reading is a data error upstream, not something to average over.
 */
export function finiteArray(values: Values, what = 'values'): number[] {
	const out = new Array<number>(values.length);
	for (let i = 0; i < values.length; i++) {
		const v = values[i];
		if (typeof v !== 'number' || !Number.isFinite(v)) {
			throw new RangeError(`${what}[${i}] is not a finite number`);
		}
		out[i] = v;
	}
	assertFiniteSums(out, what);
	return out;
}

/** Largest spread the moments can square and sum over a million values without overflow. */
export const MAX_SPREAD = 1e150;

/**
 * Throws a RangeError when the sum of `values`, their spread (max − min) or its square times
 * the count is not finite: [1e308, -1e308, 1e308] are each finite, yet their mean, range and
 * variance overflow to Infinity or NaN.
 */
export function assertFiniteSums(values: readonly number[], what = 'values'): void {
	let sum = 0;
	let min = Infinity;
	let max = -Infinity;
	for (const v of values) {
		sum += v;
		if (v < min) min = v;
		if (v > max) max = v;
	}
	if (values.length === 0) return;
	const spread = max - min;
	if (!Number.isFinite(sum) || !Number.isFinite(spread) || !Number.isFinite(spread * spread * values.length) || spread > MAX_SPREAD) {
		throw new RangeError(`${what} are too large to sum: keep them within ${MAX_SPREAD} of each other and their total finite`);
	}
}

/** Ascending numeric sort of a copy (never the default string sort). */
export function sortedCopy(values: Values, what = 'values'): number[] {
	return finiteArray(values, what).sort((a, b) => a - b);
}

/** Throws unless `k` is a non-negative safe integer (a count). */
export function assertCount(k: number, what: string): void {
	if (!Number.isSafeInteger(k) || k < 0) {
		throw new RangeError(`${what} must be a non-negative integer, got ${k}`);
	}
}
