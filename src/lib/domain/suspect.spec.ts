// Suspect entries against constructed fleets. The modified z-score and its 3.5 threshold are
// Iglewicz & Hoaglin (1993), docs/REFERENCES.md B7; 25.4 mm per inch exactly (NIST SP 811).
import { describe, expect, it } from 'vitest';
import { suspectReasons, type SuspectBaseline } from './suspect';

const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	const m = s.length >> 1;
	return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
function baseline(xs: number[]): SuspectBaseline {
	const med = median(xs);
	const logs = xs.filter((x) => x > 0).map(Math.log);
	const lm = median(logs);
	return {
		n: xs.length,
		median: med,
		mad: median(xs.map((x) => Math.abs(x - med))),
		min: Math.min(...xs),
		max: Math.max(...xs),
		logMedian: lm,
		logMad: median(logs.map((x) => Math.abs(x - lm)))
	};
}

// An exhaust clearance fleet: most guides 0.040–0.080 mm, a worn tail out to 0.250 mm.
const clearance = [
	0.04, 0.045, 0.05, 0.052, 0.055, 0.058, 0.06, 0.062, 0.065, 0.068, 0.07, 0.075, 0.08, 0.09,
	0.1, 0.12, 0.15, 0.18, 0.25
];
const cb = baseline(clearance);

describe('suspectReasons', () => {
	it('does not flag honest wear on the log scale, where the linear score does', () => {
		// median 0.068, MAD 0.016: linear M(0.25) = 0.6745·0.182/0.016 = 7.672 > 3.5;
		// on ln: median −2.688248, MAD 0.268264, M(0.25) = 3.2735 ≤ 3.5.
		expect(cb.median).toBe(0.068);
		expect(cb.mad).toBeCloseTo(0.016, 12);
		// The linear scale even reads the worn 0.25 mm as a misplaced decimal point (0.025 mm).
		const linear = suspectReasons({ value: 0.25, baseline: cb, logScale: false }).reasons;
		expect(linear.map((r) => r.kind)).toEqual(['unit-slip', 'modified-z']);
		expect(linear[1].kind === 'modified-z' && linear[1].z).toBeCloseTo(7.67244, 4);
		expect(suspectReasons({ value: 0.25, baseline: cb, logScale: true }).reasons).toEqual([]);
		expect(suspectReasons({ value: 0.18, baseline: cb, logScale: true }).reasons).toEqual([]);
	});

	it('flags an inch value typed into a mm column as a unit slip', () => {
		// 0.065 mm typed as 0.0026 in: ×25.4 = 0.06604 mm, inside the fleet.
		const v = suspectReasons({ value: 0.0026, baseline: cb, logScale: true });
		expect(v.reasons[0]).toMatchObject({ kind: 'unit-slip', factor: 25.4 });
		expect(v.reasons.map((r) => r.kind)).toEqual(['unit-slip', 'beyond-record', 'modified-z']);
		expect(v.severity).toBe(1000);
	});

	it('flags a misplaced decimal point as a unit slip (÷10)', () => {
		const v = suspectReasons({ value: 0.62, baseline: cb, logScale: true });
		expect(v.reasons[0]).toMatchObject({ kind: 'unit-slip', factor: 0.1 });
		expect(v.reasons[0].kind === 'unit-slip' && v.reasons[0].corrected).toBeCloseTo(0.062, 12);
	});

	it('flags a gross value that no unit explains by its modified z alone', () => {
		// A stem diameter fleet around 6.97 mm; 3.5 mm is no slip of 25.4 or 10.
		const stems = [6.95, 6.955, 6.96, 6.962, 6.965, 6.968, 6.97, 6.972, 6.975, 6.98];
		const v = suspectReasons({ value: 3.5, baseline: baseline(stems), logScale: false });
		expect(v.reasons.map((r) => r.kind)).toEqual(['beyond-record', 'modified-z']);
	});

	it('flags a clearance that disagrees with its own bore − stem beyond 0.005 mm', () => {
		const ok = suspectReasons({ value: 0.065, baseline: cb, logScale: true, boreMinusStem: 0.061 });
		expect(ok.reasons).toEqual([]);
		const bad = suspectReasons({ value: 0.065, baseline: cb, logScale: true, boreMinusStem: 0.045 });
		expect(bad.reasons).toHaveLength(1);
		expect(bad.reasons[0]).toMatchObject({ kind: 'clearance-mismatch', expected: 0.045 });
		expect(bad.reasons[0].kind === 'clearance-mismatch' && bad.reasons[0].difference).toBeCloseTo(0.02, 12);
	});

	it('has nothing to say when the fleet has no spread', () => {
		const flat = baseline([0.05, 0.05, 0.05, 0.05, 0.06]);
		expect(suspectReasons({ value: 0.06, baseline: flat, logScale: false }).reasons).toEqual([]);
	});
});
