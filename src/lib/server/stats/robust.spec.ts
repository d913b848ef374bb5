import fc from 'fast-check';
import { describe as group, expect, it } from 'vitest';
import { modifiedZ, outlierReasons, percentileRank, tukeyFlag } from './robust';
import { describe } from './summary';

// Grubbs' uranium-isotope data: NIST e-Handbook §1.3.5.17 via heike/outlierTests (docs/REFERENCES.md B6 [S]).
const GRUBBS = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57];

group('modifiedZ (Iglewicz & Hoaglin 1993)', () => {
	it('Grubbs data: M = −1.3965, −1.2473, −0.7999, −0.3728, 0.3728, 0.3932, 0.5491, 29.9627', () => {
		// docs/REFERENCES.md B7: median 201.37, MAD 0.995, modified z values [C]
		const s = describe(GRUBBS);
		const expected = [-1.3965, -1.2473, -0.7999, -0.3728, 0.3728, 0.3932, 0.5491, 29.9627];
		GRUBBS.forEach((x, i) => expect(modifiedZ(x, s.quantiles.p50, s.mad)).toBeCloseTo(expected[i], 4));
		// docs/REFERENCES.md B7: only 245.57 exceeds 3.5
		const flagged = GRUBBS.filter((x) => Math.abs(modifiedZ(x, s.quantiles.p50, s.mad) as number) > 3.5);
		expect(flagged).toEqual([245.57]);
	});
	it('is null when MAD is 0 or the fleet is empty', () => {
		// Definition: 0.6745·(x − median)/MAD is undefined for MAD = 0 (STYLE.md §2.6: null, never NaN/Infinity)
		expect(modifiedZ(5, 4, 0)).toBeNull();
		expect(modifiedZ(5, null, null)).toBeNull();
	});
	it('R mad(1:9) data: x = 9 gives 0.6745·4/2 = 1.349', () => {
		// R help for mad(): raw MAD of 1:9 is 2 (docs/REFERENCES.md B7 [S]); arithmetic [C]
		expect(modifiedZ(9, 5, 2)).toBeCloseTo(1.349, 12);
	});
});

group('tukeyFlag (Tukey 1977 inner fences)', () => {
	it('Grubbs data: fences 197.051 / 204.981 flag only 245.57, as high', () => {
		// docs/REFERENCES.md B7: type-7 quartiles 200.025 / 202.0075, fences 197.051 / 204.981 [C]
		const { fences } = describe(GRUBBS);
		expect(GRUBBS.map((x) => tukeyFlag(x, fences))).toEqual([null, null, null, null, null, null, null, 'high']);
		expect(tukeyFlag(150, fences)).toBe('low');
	});
	it('fences are exclusive and null fences flag nothing', () => {
		// Tukey: points beyond the fences are flagged; a point on the fence is not
		expect(tukeyFlag(10, { low: 10, high: 20 })).toBeNull();
		expect(tukeyFlag(20, { low: 10, high: 20 })).toBeNull();
		expect(tukeyFlag(1e9, { low: null, high: null })).toBeNull();
	});
});

group('percentileRank (share ≤ x, mid-rank for ties)', () => {
	it('hand examples', () => {
		// Definition in robust.ts [C]
		const s = [1, 2, 2, 2, 3, 4, 5, 6, 7, 8];
		expect(percentileRank(s, 0)).toBe(0); // below everything
		expect(percentileRank(s, 1)).toBe(0.1); // 1 of 10 values ≤ 1
		expect(percentileRank(s, 2)).toBe(0.3); // ranks 2, 3, 4 → mid-rank 3 → 3/10
		expect(percentileRank(s, 2.5)).toBe(0.4); // not present: 4 of 10 values ≤ 2.5
		expect(percentileRank(s, 8)).toBe(1);
		expect(percentileRank(s, 100)).toBe(1);
		expect(percentileRank([], 3)).toBeNull();
	});
	it('agrees with a brute-force count on random fleets', () => {
		// Definition in robust.ts: E = 0 → B/n; E > 0 → (B + (E + 1)/2)/n  [C]
		fc.assert(
			fc.property(
				fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 1, maxLength: 60 }),
				fc.integer({ min: -25, max: 25 }),
				(xs, x) => {
					const s = [...xs].sort((a, b) => a - b);
					const below = s.filter((v) => v < x).length;
					const equal = s.filter((v) => v === x).length;
					const expected = equal === 0 ? below / s.length : (below + (equal + 1) / 2) / s.length;
					expect(percentileRank(s, x)).toBeCloseTo(expected, 12);
				}
			)
		);
	});
});

group('outlierReasons', () => {
	const s = describe(GRUBBS);
	const base = { fences: s.fences, median: s.quantiles.p50, mad: s.mad };

	it('245.57 with an upper limit of 210: above limit, above the Tukey fence, and modified z ≈ 30', () => {
		// Grubbs data and its fences / modified z from docs/REFERENCES.md B7 [C]
		const reasons = outlierReasons({ value: 245.57, limits: { min: 195, max: 210 }, ...base });
		expect(reasons.map((r) => r.code)).toEqual(['above_limit', 'tukey_high', 'modified_z']);
		expect(reasons[0].text).toBe('245.57 is above the upper limit 210.');
		expect(reasons[1].text).toBe('245.57 is above the high fence 204.981 (Q3 + 1.5 × IQR).');
		expect(reasons[2].text).toContain('30.0');
	});
	it('writes readings and limits with the measurement\'s decimals and summaries with one more', () => {
		// Same Grubbs data as above (docs/REFERENCES.md B7 [C]); only the formatting differs.
		const reasons = outlierReasons({ value: 245.57, limits: { min: 195, max: 210 }, ...base, decimals: 1 });
		expect(reasons[0].text).toBe('245.6 is above the upper limit 210.0.');
		expect(reasons[1].text).toBe('245.6 is above the high fence 204.98 (Q3 + 1.5 × IQR).');
		expect(reasons[2].text).toMatch(/\(far from the median \d+\.\d{2}\)\.$/);
	});
	it('a value inside everything has no reasons', () => {
		// Grubbs data, docs/REFERENCES.md B7 [C]
		expect(outlierReasons({ value: 200.19, limits: { min: 195, max: 210 }, ...base })).toEqual([]);
	});
	it('below the lower limit and the low fence, with absent upper limit', () => {
		// Fences 197.051 / 204.981 and modified z for 190: 0.6745·(190 − 201.37)/0.995 = −7.7 (docs/REFERENCES.md B7 data) [C]
		const reasons = outlierReasons({ value: 190, limits: { min: 195 }, ...base });
		expect(reasons.map((r) => r.code)).toEqual(['below_limit', 'tukey_low', 'modified_z']);
		expect(reasons[2].text).toContain('-7.7');
	});
	it('limits are inclusive; MAD 0 suppresses the modified-z reason', () => {
		// Definition in robust.ts
		const reasons = outlierReasons({
			value: 10,
			limits: { min: 10, max: 10 },
			fences: { low: null, high: null },
			median: 3,
			mad: 0
		});
		expect(reasons).toEqual([]);
	});
});
