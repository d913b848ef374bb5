// What one reading suggests doing at its valve position, with the rule in words. These are the
// trade's usual first moves (../shared/DOMAIN.md, "Decision per valve position"): guides come
// first, because every seat cut pilots off the guide; a stem, margin or face out of limits means
// a new valve; a seat out of round or too wide is recut; a seal test that fails is lapped again.
// They suggest; a person decides, against the engine maker's service data.
import { MEASUREMENT_INFO, UNIT_LABEL, fixedApart, type Measurement, type Stage } from '../../measurements';
import type { DecisionKindName } from '../../schemas/stats';

export interface RuleLimits {
	min: number | null;
	max: number | null;
}

export interface Suggestion {
	/** null: this reading alone calls for no repair (or cannot be judged). */
	decision: DecisionKindName | null;
	rule: string;
}

/** Shown with every suggestion. */
export const CAUTION =
	"Limits here are the shop's own entries. They do not replace the engine maker's service data; a worn guide or seat left in service can drop a valve and destroy the engine.";


/**
 * The suggestion for one reading, judged against the limits in force (`limits`) and, for an
 * as-received clearance, the final (rework) limits too: a clearance within the service limit
 * but looser than the rework limit is knurled and reamed, or the guide replaced.
 */
export function suggestDecision(
	measurement: Measurement,
	stage: Stage,
	value: number,
	limits: RuleLimits | null,
	reworkLimits?: RuleLimits | null
): Suggestion {
	const info = MEASUREMENT_INFO[measurement];
	const unit = UNIT_LABEL[info.unit];
	const what = info.label.charAt(0).toUpperCase() + info.label.slice(1);
	// Limits with the measurement's usual decimals; the value with as many as it takes not to
	// look equal to the limit it is judged against.
	const fmt = (x: number) => x.toFixed(info.decimals);
	const near = limits && limits.max !== null && value > limits.max ? limits.max : (limits?.min ?? null);
	const v = `${fixedApart(value, near, info.decimals)} ${unit}`;
	if (!limits || (limits.min === null && limits.max === null)) {
		return { decision: null, rule: `No limits are set for this family and measurement, so the reading cannot be judged.` };
	}
	const over = limits.max !== null && value > limits.max;
	const under = limits.min !== null && value < limits.min;
	const limitName = stage === 'as_received' ? 'service limit' : 'rework limit';
	const overText = over ? `${what} ${v} is over the ${limitName} ${fmt(limits.max as number)} ${unit}` : '';
	const underText = under ? `${what} ${v} is under the ${limitName} ${fmt(limits.min as number)} ${unit}` : '';

	switch (measurement) {
		case 'clearance':
		case 'guide_bore':
			if (over) {
				return {
					decision: 'replace_guide',
					rule: `${overText}: replace the guide. Guides come first: every seat cut pilots off the guide.`
				};
			}
			if (under && stage === 'final') return { decision: null, rule: `${underText}: ream the guide to size.` };
			if (measurement === 'clearance' && stage === 'as_received' && reworkLimits?.max != null && value > reworkLimits.max) {
				return {
					decision: 'knurl_guide',
					rule: `${what} ${v} is within the service limit but over the rework limit ${fmt(reworkLimits.max)} ${unit}: knurl and ream the guide, or replace it (knurling is a short-term repair).`
				};
			}
			break;
		case 'stem_diameter':
		case 'margin':
			if (under) return { decision: 'replace_valve', rule: `${underText}: replace the valve.` };
			if (over && stage === 'final') return { decision: 'replace_valve', rule: `${overText}: check the part; replace the valve.` };
			break;
		case 'face_runout':
			if (over) return { decision: 'replace_valve', rule: `${overText}: the valve is bent or its face is out of true; replace the valve.` };
			break;
		case 'seat_runout':
			if (over) return { decision: 'recut_seat', rule: `${overText}: recut the seat, concentric with the guide.` };
			break;
		case 'seat_width':
			if (over || under) {
				return { decision: 'recut_seat', rule: `${over ? overText : underText}: recut the seat to bring the contact band into width.` };
			}
			break;
		case 'roughness_ra':
		case 'vacuum_hold':
		case 'fluid_hold':
			if (over || under) return { decision: 'lap', rule: `${over ? overText : underText}: lap the valve again and retest.` };
			break;
		case 'leakdown':
			if (over) {
				return {
					decision: null,
					rule: `${overText}: listen where the air escapes (intake, exhaust, crankcase, coolant) before deciding on the head.`
				};
			}
			break;
	}
	if (over || under) return { decision: null, rule: `${over ? overText : underText}: check the position before deciding.` };
	return { decision: null, rule: `${what} ${v} is within the limits: this reading alone calls for no repair.` };
}
