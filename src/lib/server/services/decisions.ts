// The suggested decision for one valve position, from its as-received readings and the limits
// in effect on the day they were taken, with the rule in words. Pure: no database, no clock.
//
// The order of the rules is the order of the work (common practice): the guide comes first,
// because every seat cut and valve face grind pilots off the guide; a seat cut on a worn guide
// is not concentric with the stem. The decision names the main work on the position; the rule
// text lists the rest.
import type { Measurement, Side } from '$lib/measurements';
import { DECISION_KINDS } from '../db/schema/enums';

export type DecisionKind = (typeof DECISION_KINDS)[number];

export { DECISION_LABEL } from '$lib/measurements';

export interface Bounds {
	min: number | null;
	max: number | null;
}

export interface DecisionInput {
	side: Side;
	/** As-received values in canonical units (mm), by measurement; the largest bore as guide_bore. */
	values: Partial<Record<Measurement, number>>;
	/** As-received (service) limits in effect on the day of the readings. */
	limits: Partial<Record<Measurement, Bounds>>;
	/** The final-stage clearance maximum: the size the shop's own guide work must reach. */
	reworkClearanceMax: number | null;
	/** Ovality and taper of the guide bore, when it was gauged in two directions / at two heights. */
	ovality?: number | null;
	taper?: number | null;
}

/** The guide's state: within the rework size, worn past it but within the service limit, or out. */
export type GuideState = 'ok' | 'worn' | 'out' | 'unknown';

export interface Suggestion {
	kind: DecisionKind | null;
	/** The rule that decided, in words, followed by any further work the readings call for. */
	rule: string;
	guide: GuideState;
}

const mm = (x: number) => `${x.toFixed(3)} mm`;
const mm2 = (x: number) => `${x.toFixed(2)} mm`;

export function guideState(input: DecisionInput): { state: GuideState; reason: string } {
	const clr = input.values.clearance;
	const bore = input.values.guide_bore;
	const service = input.limits.clearance?.max ?? null;
	const boreMax = input.limits.guide_bore?.max ?? null;
	if (clr !== undefined && service !== null && clr > service) {
		return { state: 'out', reason: `clearance ${mm(clr)} is over the service limit ${mm(service)}` };
	}
	if (bore !== undefined && boreMax !== null && bore > boreMax) {
		return { state: 'out', reason: `the largest guide bore ${mm(bore)} is over the limit ${mm(boreMax)}` };
	}
	if (clr !== undefined && input.reworkClearanceMax !== null && clr > input.reworkClearanceMax) {
		return {
			state: 'worn',
			reason: `clearance ${mm(clr)} is within the service limit${service !== null ? ` ${mm(service)}` : ''} but over the rework size ${mm(input.reworkClearanceMax)}`
		};
	}
	if (clr === undefined) return { state: 'unknown', reason: 'no clearance was measured, so the guide was not judged' };
	return { state: 'ok', reason: '' };
}

export function suggestDecision(input: DecisionInput): Suggestion {
	const v = input.values;
	const lim = (m: Measurement) => input.limits[m] ?? { min: null, max: null };
	if (Object.keys(v).length === 0) return { kind: null, rule: 'No as-received readings yet.', guide: 'unknown' };

	const guide = guideState(input);
	const valveReplace: string[] = [];
	const valveReface: string[] = [];
	const seat: string[] = [];

	const stemMin = lim('stem_diameter').min;
	if (v.stem_diameter !== undefined && stemMin !== null && v.stem_diameter < stemMin) valveReplace.push(`stem ${mm(v.stem_diameter)} is under the minimum ${mm(stemMin)}`);
	const marginMin = lim('margin').min;
	const marginLow = v.margin !== undefined && marginMin !== null && v.margin < marginMin;
	if (marginLow) valveReplace.push(`margin ${mm2(v.margin!)} is under the minimum ${mm2(marginMin!)}`);
	const faceMax = lim('face_runout').max;
	if (v.face_runout !== undefined && faceMax !== null && v.face_runout > faceMax) {
		const why = `face runout ${mm(v.face_runout)} is over ${mm(faceMax)}`;
		// A face can be ground true only while the margin stays above its minimum.
		if (marginLow) valveReplace.push(why);
		else valveReface.push(why);
	}
	const seatMax = lim('seat_runout').max;
	if (v.seat_runout !== undefined && seatMax !== null && v.seat_runout > seatMax) seat.push(`seat runout ${mm(v.seat_runout)} is over ${mm(seatMax)}`);
	const w = lim('seat_width');
	if (v.seat_width !== undefined && ((w.min !== null && v.seat_width < w.min) || (w.max !== null && v.seat_width > w.max))) {
		seat.push(`seat width ${mm2(v.seat_width)} is outside ${w.min !== null ? mm2(w.min) : '…'} – ${w.max !== null ? mm2(w.max) : '…'}`);
	}

	let kind: DecisionKind;
	let main: string;
	if (guide.state === 'out') {
		kind = 'replace_guide';
		main = `${cap(guide.reason)}: replace the guide.`;
	} else if (valveReplace.length) {
		kind = 'replace_valve';
		main = `${cap(valveReplace.shift()!)}: replace the valve.`;
	} else if (guide.state === 'worn') {
		kind = 'knurl_guide';
		main = `${cap(guide.reason)}: knurl and ream the guide back to size (a short-term repair; replace the guide if the head must last).`;
	} else if (valveReface.length) {
		kind = 'reface_valve';
		main = `${cap(valveReface.shift()!)}: reface the valve (the margin allows it).`;
	} else if (seat.length) {
		kind = 'recut_seat';
		main = `${cap(seat.shift()!)}: recut the seat.`;
	} else {
		kind = 'lap';
		main = 'All readings are within the limits: lap the valve to its seat.';
	}

	const also = [...valveReplace.map((r) => `${r} (replace the valve)`), ...valveReface.map((r) => `${r} (reface the valve)`), ...seat.map((r) => `${r} (recut the seat)`)];
	const parts = [main];
	if (also.length) parts.push(`Also: ${also.join('; ')}.`);
	if ((guide.state === 'out' || guide.state === 'worn') && (seat.length || kind === 'recut_seat' || valveReface.length)) {
		parts.push('Do the guide work first: the seat cutter pilots off the guide.');
	}
	if (input.ovality != null && input.taper != null && (guide.state === 'out' || guide.state === 'worn')) {
		parts.push(`Guide ovality ${mm(input.ovality)}, taper ${mm(input.taper)}.`);
	}
	if (guide.state === 'unknown') parts.push(`Note: ${guide.reason}.`);
	return { kind, rule: parts.join(' '), guide: guide.state };
}

const SEAT_CUTS: readonly DecisionKind[] = ['recut_seat', 'replace_seat'];

/**
 * The warning a person must acknowledge before saving a seat cut on a guide that is still
 * worn or out of limits: the cutter pilots off the guide, so the new seat will not be concentric
 * with the stem. Null when there is nothing to warn about.
 */
export function seatCutWarning(kind: DecisionKind, guide: GuideState): string | null {
	if (!SEAT_CUTS.includes(kind)) return null;
	if (guide === 'out') return 'The guide is out of limits. A seat cut now pilots off a worn guide and will not be concentric with the stem: replace the guide first.';
	if (guide === 'worn') return 'The guide is worn past the rework size. A seat cut now pilots off a worn guide: knurl or replace the guide first.';
	return null;
}

function cap(s: string): string {
	return s.charAt(0).toUpperCase() + s.slice(1);
}
