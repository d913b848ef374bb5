// Why a reading is a *suspect entry* (a likely typing, unit or gauge error to check), judged
// against a FIXED fleet baseline: the whole shop's family × side × measurement × stage series,
// never a filtered subset. Worn readings beyond the family's limits are not suspects: they are
// ordinary failures and belong to the rates.
//
// Reasons, most implausible first:
//  - 'unit-slip': the value ×25.4, ÷25.4, ×10 or ÷10 lands inside the fleet's usual range
//    (median ± 3.5 robust spreads) while the value itself is far outside it — an inch value in a
//    mm column, a misplaced decimal point.
//  - 'beyond-record': beyond the smallest or largest reading the fleet has on record (for a new
//    value checked against the fleet; a reading of the fleet itself is never beyond its own record).
//  - 'modified-z': |M| > 3.5 (Iglewicz & Hoaglin 1993; docs/REFERENCES.md B7). For strictly
//    positive, right-skewed quantities (clearance, runout, roughness: worn guides and seats give
//    them a long upper tail) the score is taken on ln(value), so an honest worn reading two or
//    three times the median is not flagged while a value ten or 25 times it still is.
//  - 'clearance-mismatch': a clearance that disagrees with its own bore − stem (same position and
//    stage) by more than CLEARANCE_TOLERANCE_MM — common practice: a few gauge resolutions (0.001 mm
//    each for bore, stem and clearance) plus rounding; 0.005 mm.
// Imports nothing outside this folder.
import { MODIFIED_Z_THRESHOLD, modifiedZ } from './robust';

/** Unit slips we look for: the factor that would bring the typed value back. */
export const UNIT_SLIP_FACTORS = [25.4, 1 / 25.4, 10, 1 / 10] as const;
/** Clearance vs bore − stem: common practice, a few gauge resolutions (0.001 mm) plus rounding. */
export const CLEARANCE_TOLERANCE_MM = 0.005;

/** One series of the fleet baseline (family × side × measurement × stage). */
export type SuspectBaseline = {
	n: number;
	median: number | null;
	mad: number | null;
	min: number | null;
	max: number | null;
	/** Median and MAD of ln(value) over the strictly positive readings; null when not used. */
	logMedian: number | null;
	logMad: number | null;
};

export type SuspectReason =
	| { kind: 'unit-slip'; factor: number; corrected: number }
	| { kind: 'beyond-record'; side: 'low' | 'high' }
	| { kind: 'modified-z'; z: number; log: boolean }
	| { kind: 'clearance-mismatch'; expected: number; difference: number };

export type SuspectInput = {
	value: number;
	baseline: SuspectBaseline;
	/** Score on the log scale (strictly positive, right-skewed quantities). */
	logScale: boolean;
	/** For a clearance: bore − stem at the same position and stage, when both were read. */
	boreMinusStem?: number | null;
};

export type SuspectVerdict = {
	reasons: SuspectReason[];
	/** How implausible, for sorting: the largest |score| found (unit slips and mismatches rank high). */
	severity: number;
};

/** The score of a value against the baseline, on the log scale when asked and possible. */
export function suspectScore(value: number, b: SuspectBaseline, logScale: boolean): number | null {
	if (logScale) {
		if (!(value > 0)) return value <= 0 && b.logMedian !== null ? -Infinity : null;
		return modifiedZ(Math.log(value), b.logMedian, b.logMad);
	}
	return modifiedZ(value, b.median, b.mad);
}

const within = (z: number | null) => z !== null && Math.abs(z) <= MODIFIED_Z_THRESHOLD;

/** Why `value` is a suspect entry against its fleet baseline; no reasons means it is not one. */
export function suspectReasons(input: SuspectInput): SuspectVerdict {
	const { value, baseline: b, logScale } = input;
	const reasons: SuspectReason[] = [];
	let severity = 0;
	const z = suspectScore(value, b, logScale);
	const far = z !== null && Math.abs(z) > MODIFIED_Z_THRESHOLD;
	if (far) {
		// The factor that brings the value closest to the fleet's centre, if any brings it inside.
		let best: { factor: number; corrected: number; z: number } | null = null;
		for (const factor of UNIT_SLIP_FACTORS) {
			const corrected = value * factor;
			const zc = suspectScore(corrected, b, logScale);
			if (zc !== null && within(zc) && (best === null || Math.abs(zc) < Math.abs(best.z)))
				best = { factor, corrected, z: zc };
		}
		if (best) {
			reasons.push({ kind: 'unit-slip', factor: best.factor, corrected: best.corrected });
			severity = Math.max(severity, 1000);
		}
	}
	if (b.min !== null && b.max !== null && b.n > 0) {
		if (value < b.min) reasons.push({ kind: 'beyond-record', side: 'low' });
		if (value > b.max) reasons.push({ kind: 'beyond-record', side: 'high' });
	}
	if (far && z !== null) {
		reasons.push({ kind: 'modified-z', z, log: logScale });
		severity = Math.max(severity, Number.isFinite(z) ? Math.abs(z) : 999);
	}
	if (input.boreMinusStem != null) {
		const difference = value - input.boreMinusStem;
		if (Math.abs(difference) > CLEARANCE_TOLERANCE_MM + 1e-9) {
			reasons.push({ kind: 'clearance-mismatch', expected: input.boreMinusStem, difference });
			severity = Math.max(severity, 500 + Math.abs(difference));
		}
	}
	return { reasons, severity };
}
