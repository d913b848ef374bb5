// The fleet's usual range (Tukey's fences) held inside the quantity's physical bounds: a
// clearance or a runout cannot be below 0, so a fence below 0 is shown as 0 and said to be.

export interface UsualRange {
	/** Null when the fleet has too few readings for fences. */
	low: number | null;
	high: number | null;
	/** True when a fence lay beyond the physical bound and was set to the bound. */
	clippedLow: boolean;
	clippedHigh: boolean;
}

export function usualRange(fences: { low: number | null; high: number | null }, bounds: { min: number; max: number | null }): UsualRange {
	const clippedLow = fences.low !== null && fences.low < bounds.min;
	const clippedHigh = bounds.max !== null && fences.high !== null && fences.high > bounds.max;
	return {
		low: clippedLow ? bounds.min : fences.low,
		high: clippedHigh ? (bounds.max as number) : fences.high,
		clippedLow,
		clippedHigh
	};
}
