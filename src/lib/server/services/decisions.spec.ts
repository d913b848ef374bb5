import { describe, expect, it } from 'vitest';
import { guideState, seatCutWarning, suggestDecision, type DecisionInput } from './decisions';

// Limits of an invented intake side: stem 5.45 mm minimum, clearance service limit 0.100 mm,
// rework size 0.065 mm, face runout 0.040, seat runout 0.050, seat width 1.00–1.60, margin
// 0.80 mm. The figures are typical of the trade (common practice, DOMAIN.md), not a maker's data.
const limits: DecisionInput['limits'] = {
	stem_diameter: { min: 5.45, max: null },
	guide_bore: { min: null, max: 5.575 },
	clearance: { min: null, max: 0.1 },
	face_runout: { min: null, max: 0.04 },
	seat_runout: { min: null, max: 0.05 },
	seat_width: { min: 1.0, max: 1.6 },
	margin: { min: 0.8, max: null }
};
const good = { stem_diameter: 5.47, guide_bore: 5.515, clearance: 0.045, face_runout: 0.01, seat_runout: 0.02, seat_width: 1.3, margin: 1.3 };
const input = (values: DecisionInput['values'], extra: Partial<DecisionInput> = {}): DecisionInput => ({
	side: 'intake',
	values,
	limits,
	reworkClearanceMax: 0.065,
	...extra
});

describe('suggestDecision', () => {
	it('says so when nothing was measured', () => {
		expect(suggestDecision(input({}))).toEqual({ kind: null, rule: 'No as-received readings yet.', guide: 'unknown' });
	});

	it('laps a position with every reading inside the limits', () => {
		const s = suggestDecision(input(good));
		expect(s.kind).toBe('lap');
		expect(s.rule).toBe('All readings are within the limits: lap the valve to its seat.');
		expect(s.guide).toBe('ok');
	});

	it('replaces a guide over the service limit, before anything else, and says the seat follows it', () => {
		const s = suggestDecision(input({ ...good, guide_bore: 5.612, clearance: 0.142, seat_runout: 0.07 }, { ovality: 0.021, taper: 0.034 }));
		expect(s.kind).toBe('replace_guide');
		expect(s.rule).toContain('Clearance 0.142 mm is over the service limit 0.100 mm: replace the guide.');
		expect(s.rule).toContain('Also: seat runout 0.070 mm is over 0.050 mm (recut the seat).');
		expect(s.rule).toContain('Do the guide work first');
		expect(s.rule).toContain('Guide ovality 0.021 mm, taper 0.034 mm.');
		expect(s.guide).toBe('out');
	});

	it('treats a bore over its own limit as a guide out of limits even when no stem was measured', () => {
		const s = suggestDecision(input({ guide_bore: 5.6, seat_runout: 0.02 }));
		expect(s.kind).toBe('replace_guide');
		expect(s.rule).toMatch(/^The largest guide bore 5\.600 mm is over the limit 5\.575 mm/);
	});

	it('knurls a guide within the service limit but past the rework size', () => {
		const s = suggestDecision(input({ ...good, clearance: 0.08 }));
		expect(s.kind).toBe('knurl_guide');
		expect(s.rule).toMatch(/^Clearance 0\.080 mm is within the service limit 0\.100 mm but over the rework size 0\.065 mm: knurl/);
		expect(s.guide).toBe('worn');
	});

	it('replaces a valve with a worn stem or a thin margin; refaces one with only face runout', () => {
		expect(suggestDecision(input({ ...good, stem_diameter: 5.44, clearance: 0.075 })).kind).toBe('replace_valve');
		expect(suggestDecision(input({ ...good, margin: 0.7 })).rule).toBe('Margin 0.70 mm is under the minimum 0.80 mm: replace the valve.');
		const reface = suggestDecision(input({ ...good, face_runout: 0.06 }));
		expect(reface.kind).toBe('reface_valve');
		// A thin margin leaves nothing to grind: the same runout then means a new valve.
		expect(suggestDecision(input({ ...good, face_runout: 0.06, margin: 0.7 })).kind).toBe('replace_valve');
	});

	it('recuts a seat that runs out or is too wide', () => {
		expect(suggestDecision(input({ ...good, seat_runout: 0.051 })).kind).toBe('recut_seat');
		const wide = suggestDecision(input({ ...good, seat_width: 1.75 }));
		expect(wide.kind).toBe('recut_seat');
		expect(wide.rule).toBe('Seat width 1.75 mm is outside 1.00 mm – 1.60 mm: recut the seat.');
	});

	it('judges limits inclusively: a value on the limit passes', () => {
		expect(suggestDecision(input({ ...good, clearance: 0.1, seat_runout: 0.05 })).kind).toBe('knurl_guide');
		expect(suggestDecision(input({ ...good, clearance: 0.065, seat_runout: 0.05 })).kind).toBe('lap');
	});

	it('notes a position whose guide could not be judged', () => {
		const s = suggestDecision(input({ seat_runout: 0.02, seat_width: 1.2 }));
		expect(s.kind).toBe('lap');
		expect(s.guide).toBe('unknown');
		expect(s.rule).toContain('no clearance was measured');
	});
});

describe('guide before seat', () => {
	it('warns against a seat cut on a guide out of limits or worn', () => {
		expect(seatCutWarning('recut_seat', 'out')).toMatch(/replace the guide first/);
		expect(seatCutWarning('replace_seat', 'worn')).toMatch(/knurl or replace the guide first/);
		expect(seatCutWarning('recut_seat', 'ok')).toBeNull();
		expect(seatCutWarning('lap', 'out')).toBeNull();
	});

	it('reads the guide state from clearance against the service and rework limits', () => {
		expect(guideState(input({ clearance: 0.101 })).state).toBe('out');
		expect(guideState(input({ clearance: 0.066 })).state).toBe('worn');
		expect(guideState(input({ clearance: 0.065 })).state).toBe('ok');
		expect(guideState(input({ stem_diameter: 5.47 })).state).toBe('unknown');
	});
});
