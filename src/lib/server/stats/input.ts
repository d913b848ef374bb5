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
	return out;
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
