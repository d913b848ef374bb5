import { describe, expect, it } from 'vitest';
import { suggestDecision } from './decision-rules';

// Limits below are the typical values of ../shared/DOMAIN.md (from memory there, and used here only
// as inputs: the rules are checked, not the limits).
const service = { min: null, max: 0.1 };
const rework = { min: 0.025, max: 0.065 };

describe('suggestDecision', () => {
	it('clearance over the service limit → replace the guide, saying why', () => {
		const s = suggestDecision('clearance', 'as_received', 0.112, service, rework);
		expect(s.decision).toBe('replace_guide');
		expect(s.rule).toBe('Stem-to-guide clearance 0.112 mm is over the service limit 0.100 mm: replace the guide. Guides come first: every seat cut pilots off the guide.');
	});

	it('writes a value just over the limit with the decimals that tell them apart', () => {
		expect(suggestDecision('clearance', 'as_received', 0.1004, service, rework).rule).toMatch(/^Stem-to-guide clearance 0\.1004 mm is over the service limit 0\.100 mm:/);
	});

	it('clearance within service but over rework → knurl (a short-term repair) or replace', () => {
		const s = suggestDecision('clearance', 'as_received', 0.08, service, rework);
		expect(s.decision).toBe('knurl_guide');
		expect(s.rule).toMatch(/over the rework limit 0.065 mm/);
	});

	it('clearance well inside → nothing to do', () => {
		expect(suggestDecision('clearance', 'as_received', 0.05, service, rework)).toEqual({
			decision: null,
			rule: 'Stem-to-guide clearance 0.050 mm is within the limits: this reading alone calls for no repair.'
		});
	});

	it('limits are inclusive: exactly on the limit is within', () => {
		expect(suggestDecision('clearance', 'as_received', 0.1, service, null).decision).toBeNull();
	});

	it.each([
		['stem_diameter', 'as_received', 5.4, { min: 5.45, max: null }, 'replace_valve'],
		['margin', 'as_received', 0.7, { min: 0.8, max: null }, 'replace_valve'],
		['face_runout', 'as_received', 0.06, { min: null, max: 0.04 }, 'replace_valve'],
		['seat_runout', 'as_received', 0.07, { min: null, max: 0.05 }, 'recut_seat'],
		['seat_width', 'as_received', 2.5, { min: 1.4, max: 2.3 }, 'recut_seat'],
		['vacuum_hold', 'final', 85, { min: 90, max: null }, 'lap'],
		['fluid_hold', 'final', 60, { min: 120, max: null }, 'lap'],
		['roughness_ra', 'final', 0.4, { min: null, max: 0.25 }, 'lap'],
		['clearance', 'final', 0.07, rework, 'replace_guide']
	] as const)('%s %s %s outside %j → %s', (m, stage, v, lim, decision) => {
		expect(suggestDecision(m, stage, v, lim).decision).toBe(decision);
	});

	it('no limits: cannot judge', () => {
		expect(suggestDecision('clearance', 'as_received', 0.2, null)).toEqual({
			decision: null,
			rule: 'No limits are set for this family and measurement, so the reading cannot be judged.'
		});
	});
});
