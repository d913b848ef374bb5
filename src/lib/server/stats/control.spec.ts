import { describe as group, expect, it } from 'vitest';
import { averageMovingRange } from './capability';
import { controlChart } from './control';

group('controlChart (individuals / moving range)', () => {
	// Hand computation [C]: readings 10, 11, 10, 11, 10, 11, 10, 11, 10, 20 at t = 1…10.
	// MR = 1 (×8) and 10 → MR̄ = 18/9 = 2; x̄ = 114/10 = 11.4; UCL = 11.4 + 2.66·2 = 16.72,
	// LCL = 6.08; MR UCL = 3.267·2 = 6.534 (constants from docs/REFERENCES.md B5).
	const values = [10, 11, 10, 11, 10, 11, 10, 11, 10, 20];
	const points = values.map((value, i) => ({ t: i + 1, value }));

	it('limits and the points beyond them', () => {
		const c = controlChart(points);
		expect(c.n).toBe(10);
		expect(c.centre as number).toBeCloseTo(11.4, 12);
		expect(c.mrBar as number).toBeCloseTo(2, 12);
		expect(c.ucl as number).toBeCloseTo(16.72, 12);
		expect(c.lcl as number).toBeCloseTo(6.08, 12);
		expect(c.mrUcl as number).toBeCloseTo(6.534, 12);
		expect(c.mrLcl).toBe(0);
		expect(c.beyondLimits).toEqual([9]);
		expect(c.mrBeyondLimits).toEqual([9]);
		expect(c.points[0].mr).toBeNull();
		expect(c.points[9].mr).toBe(10);
	});
	it('sorts by time (Dates too) and keeps the input position', () => {
		// Definition in capability.ts: stable sort on t; indices refer to the returned points
		const shuffled = [...points].reverse().map((p) => ({ t: new Date(Date.UTC(2024, 0, p.t)), value: p.value }));
		const c = controlChart(shuffled);
		expect(c.points.map((p) => p.value)).toEqual(values);
		expect(c.points[9].sourceIndex).toBe(0);
		expect(c.beyondLimits).toEqual([9]);
	});
	it('fewer than two points: no limits', () => {
		// A moving range needs two readings (STYLE.md §2.6: null for undefined)
		const c = controlChart([{ t: 1, value: 5 }]);
		expect(c.centre).toBe(5);
		expect(c.ucl).toBeNull();
		expect(c.mrLcl).toBeNull();
		expect(c.beyondLimits).toEqual([]);
		expect(controlChart([]).centre).toBeNull();
	});
	it('averageMovingRange: mean |x_i − x_{i−1}|', () => {
		// Definition (docs/REFERENCES.md B4: σ̂ = MR̄/1.128 for individuals)
		expect(averageMovingRange([1, 4, 2, 2])).toBeCloseTo(5 / 3, 14);
		expect(averageMovingRange([1])).toBeNull();
	});
});
