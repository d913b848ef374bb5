import { describe, expect, it } from 'vitest';
import {
	addDays,
	boreGeometry,
	calibrationLapsedOn,
	checkValue,
	clearanceOf,
	DEFAULT_SEAL_MARKS,
	limitOn,
	positionsOf,
	posKey,
	parsePosKey,
	robustZ,
	typedFields,
	type LimitVersion
} from './inspection';
import { leakagePercent, parseDecimal, pressureToKpa, toCanonical, vacuumHoldPercent, distanceToKm } from './measurements';
import { modifiedZ } from './server/stats/robust';

describe('guide bore geometry (hand-worked example)', () => {
	// One exhaust guide gauged in inches in two directions at three heights, as a machinist
	// writes them down. 1 in = 25.4 mm exactly (NIST SP 811).
	//                 along        across
	//   top     0.3140 in = 7.9756   0.3132 in = 7.95528
	//   middle  0.3128 in = 7.94512  0.3127 in = 7.94258
	//   bottom  0.3136 in = 7.96544  0.3130 in = 7.9502
	// Largest bore: top along, 7.9756 mm.
	// Ovality (|along − across| per height): top 0.02032, middle 0.00254, bottom 0.01524 → 0.02032 mm at the top.
	// Taper (largest − smallest across heights, per direction): along 7.9756 − 7.94512 = 0.03048;
	//   across 7.95528 − 7.94258 = 0.0127 → 0.03048 mm, along.
	// Stem 0.3100 in = 7.874 mm → clearance 7.9756 − 7.874 = 0.1016 mm (0.0040 in).
	const inch = (x: number) => toCanonical(x, 'in');
	const cells = {
		'along:top': inch(0.314),
		'across:top': inch(0.3132),
		'along:middle': inch(0.3128),
		'across:middle': inch(0.3127),
		'along:bottom': inch(0.3136),
		'across:bottom': inch(0.313)
	} as const;

	it('converts the inches exactly', () => {
		expect(cells['along:top']).toBe(7.9756);
		expect(cells['across:bottom']).toBe(7.9502);
	});

	it('finds the largest bore, the ovality and the taper', () => {
		const g = boreGeometry(cells);
		expect(g.largest).toBe(7.9756);
		expect(g.ovality).toBe(0.02032);
		expect(g.ovalityAt).toBe('top');
		expect(g.taper).toBe(0.03048);
		expect(g.taperDirection).toBe('along');
	});

	it('works the clearance from the largest bore and the stem', () => {
		expect(clearanceOf(7.9756, inch(0.31))).toBe(0.1016);
		expect(clearanceOf(null, 7.874)).toBeNull();
		expect(clearanceOf(7.9756, undefined)).toBeNull();
	});

	it('leaves ovality and taper undefined without a pair or two heights', () => {
		expect(boreGeometry({ 'along:middle': 7.0 })).toEqual({ largest: 7, ovality: null, ovalityAt: null, taper: null, taperDirection: null });
		expect(boreGeometry({}).largest).toBeNull();
		const two = boreGeometry({ 'along:top': 7.03, 'along:bottom': 7.01 });
		expect(two.taper).toBe(0.02);
		expect(two.ovality).toBeNull();
	});
});

describe('positions and fields', () => {
	it('lists positions by cylinder, intake first', () => {
		const ps = positionsOf({ cylinders: 2, intakeValves: 2, exhaustValves: 1 });
		expect(ps.map(posKey)).toEqual(['1-intake-1', '1-intake-2', '1-exhaust-1', '2-intake-1', '2-intake-2', '2-exhaust-1']);
		expect(parsePosKey('2-exhaust-1')).toEqual({ cylinder: 2, side: 'exhaust', valve: 1 });
		expect(parsePosKey('2-exhaust-4')).toBeNull();
	});

	it('types bore cells in place of guide bore and never types clearance', () => {
		const f = typedFields('as_received');
		expect(f).toContain('bore:along:top');
		expect(f).not.toContain('guide_bore');
		expect(f).not.toContain('clearance');
		expect(typedFields('final')).toContain('vacuum_hold');
	});
});

describe('checks', () => {
	const v = (effectiveFrom: string, max: number): LimitVersion => ({ measurement: 'clearance', side: 'exhaust', stage: 'as_received', min: null, max, effectiveFrom });
	const versions = [v('2025-01-01', 0.12), v('2026-01-01', 0.1)];

	it('judges a reading by the limit of its day', () => {
		expect(limitOn(versions, 'clearance', 'exhaust', 'as_received', '2025-06-30')?.max).toBe(0.12);
		expect(limitOn(versions, 'clearance', 'exhaust', 'as_received', '2026-01-01')?.max).toBe(0.1);
		expect(limitOn(versions, 'clearance', 'exhaust', 'as_received', '2024-12-31')).toBeNull();
		const ctx = { limits: versions, marks: DEFAULT_SEAL_MARKS };
		const old = checkValue(ctx, { value: 0.11, measurement: 'clearance', side: 'exhaust', stage: 'as_received', day: '2025-06-30' });
		const now = checkValue(ctx, { value: 0.11, measurement: 'clearance', side: 'exhaust', stage: 'as_received', day: '2026-02-01' });
		expect(old).toEqual([]);
		expect(now[0].text).toBe('Stem-to-guide clearance 0.110 mm is above the maximum 0.100 mm (limits from 2026-01-01).');
	});

	it('fails a seal test under the pass marks', () => {
		const ctx = { limits: [], marks: DEFAULT_SEAL_MARKS };
		expect(checkValue(ctx, { value: 89.5, measurement: 'vacuum_hold', side: 'intake', stage: 'final', day: '2026-01-01' })[0].kind).toBe('seal');
		expect(checkValue(ctx, { value: 90, measurement: 'vacuum_hold', side: 'intake', stage: 'final', day: '2026-01-01' })).toEqual([]);
		expect(checkValue(ctx, { value: 45, measurement: 'fluid_hold', side: 'intake', stage: 'final', day: '2026-01-01' })[0].text).toBe(
			'First drip after 45 s; a pass needs no drip in 120 s.'
		);
	});

	it('flags a reading taken after its gauge’s calibration ran out', () => {
		const cals = [
			{ calibratedOn: '2025-01-10', intervalDays: 180 },
			{ calibratedOn: '2025-09-01', intervalDays: 180 }
		];
		expect(addDays('2025-01-10', 180)).toBe('2025-07-09');
		expect(calibrationLapsedOn(cals, '2025-07-09')).toBeNull();
		expect(calibrationLapsedOn(cals, '2025-07-10')).toBe('2025-07-09');
		expect(calibrationLapsedOn(cals, '2025-09-01')).toBeNull();
		expect(calibrationLapsedOn(cals, '2024-12-01')).toBeNull();
	});

	it('scores the fleet as the server statistics do (Iglewicz & Hoaglin modified z)', () => {
		const fleet = { median: 0.05, mad: 0.008, n: 500 };
		expect(robustZ(0.1, fleet)).toBeCloseTo(modifiedZ(0.1, 0.05, 0.008)!, 12);
		expect(robustZ(0.1, { ...fleet, n: 5 })).toBeNull();
		expect(robustZ(0.1, { ...fleet, mad: 0 })).toBeNull();
	});
});

describe('units', () => {
	it('converts the trade’s units exactly', () => {
		// 1 mile = 1.609344 km; 1 inHg = 3.386389 kPa; 1 psi = 6.894757293168361 kPa (NIST SP 811).
		expect(distanceToKm(100_000, 'mi')).toBe(160_934);
		expect(pressureToKpa(20, 'inHg')).toBe(67.72778);
		expect(pressureToKpa(100, 'psi')).toBe(689.475729317);
		expect(toCanonical(10, 'uin')).toBe(0.254);
	});

	it('computes leak-down and vacuum hold from the gauge pressures', () => {
		// Leak-down: (in − held) / in × 100 (DOMAIN.md). 100 psi in, 88 held → 12 %.
		expect(leakagePercent(100, 88)).toBe(12);
		expect(leakagePercent(690, 621)).toBe(10);
		expect(vacuumHoldPercent(20, 19)).toBe(95);
		expect(() => leakagePercent(100, 120)).toThrow(/held/);
		expect(() => vacuumHoldPercent(0, 0)).toThrow(/applied/);
	});

	it('reads numbers as people type them, and nothing else', () => {
		expect(parseDecimal('0.3125')).toBe(0.3125);
		expect(parseDecimal('.3125')).toBe(0.3125);
		expect(parseDecimal(' 7,062 ')).toBe(7.062);
		for (const bad of ['', '-1', '1e3', '1.2.3', 'abc', '1,000.5']) expect(parseDecimal(bad)).toBeNull();
	});
});
