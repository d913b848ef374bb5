// The modified z-score (Iglewicz & Hoaglin 1993): M = 0.6745·(x − median)/MAD, with the raw
// MAD = median |x − median|; |M| > 3.5 marks a potential outlier. 0.6745 = Φ⁻¹(3/4).
// One definition for the entry grid in the browser and the server's statistics.

/** Φ⁻¹(3/4) to four places, the factor in Iglewicz & Hoaglin's modified z-score. */
export const MODIFIED_Z_FACTOR = 0.6745;
/** |M| above this is a potential outlier (Iglewicz & Hoaglin 1993). */
export const MODIFIED_Z_THRESHOLD = 3.5;

/**
 * Modified z-score 0.6745·(x − median)/MAD with the raw (unscaled) MAD.
 * Null when MAD is 0 or missing: more than half the fleet has the same value, and
 * the score is undefined.
 */
export function modifiedZ(x: number, median: number | null, mad: number | null): number | null {
	if (median === null || mad === null || !(mad > 0)) return null;
	return (MODIFIED_Z_FACTOR * (x - median)) / mad;
}
