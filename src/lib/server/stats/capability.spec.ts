import { describe as group, expect, it } from 'vitest';
import {
	averageMovingRange,
	capability,
	capabilityIndices,
	capabilityVerdict,
	CONTROL_CHART_CONSTANTS,
	D4_MR,
	E2_MR
} from './capability';

group('capabilityIndices', () => {
	it('NIST e-Handbook §6.1.6 example: USL 20, LSL 8, x̄ 16, s 2 → Cp 1, Cpu 0.6667, Cpl 1.3333, Cpk 0.6667', () => {
		// NIST/SEMATECH e-Handbook §6.1.6 worked example [M] (docs/REFERENCES.md B4: page text not in the
		// stored corpora, so the example is from memory; the arithmetic is [C], formulas [S] SAS/QC docs)
		const r = capabilityIndices(16, 2, { lsl: 8, usl: 20 });
		expect(r.cp).toBeCloseTo(1, 14);
		expect(r.cpu as number).toBeCloseTo(4 / 6, 14);
		expect(r.cpl as number).toBeCloseTo(8 / 6, 14);
		expect(r.cpk as number).toBeCloseTo(0.6667, 4);
		// docs/REFERENCES.md B4: k = |m − x̄|/((USL − LSL)/2) = 1/3 with m = 14, and Cpk = Cp(1 − k) [C]
		const k = Math.abs(14 - 16) / ((20 - 8) / 2);
		expect(r.cpk as number).toBeCloseTo((r.cp as number) * (1 - k), 14);
	});
	it('one-sided limits: Cp null, Cpk is the applicable side', () => {
		// SAS/QC capability docs (docs/REFERENCES.md B4 [S]): Cpk = min of the available one-sided indices
		expect(capabilityIndices(16, 2, { usl: 20 })).toEqual({ cp: null, cpu: 4 / 6, cpl: null, cpk: 4 / 6 });
		expect(capabilityIndices(16, 2, { lsl: 8 })).toEqual({ cp: null, cpu: null, cpl: 8 / 6, cpk: 8 / 6 });
		expect(capabilityIndices(16, 2, {})).toEqual({ cp: null, cpu: null, cpl: null, cpk: null });
	});
	it('σ of 0 or null leaves indices null; crossed limits throw', () => {
		// Division by zero is undefined (STYLE.md §2.6: null, never NaN/Infinity)
		expect(capabilityIndices(16, 0, { lsl: 8, usl: 20 }).cp).toBeNull();
		expect(capabilityIndices(null, null, { lsl: 8, usl: 20 }).cpk).toBeNull();
		expect(() => capabilityIndices(16, 2, { lsl: 20, usl: 8 })).toThrow(RangeError);
	});
});

group('capabilityVerdict (SAS/QC documentation guidance)', () => {
	it('< 1 not capable, 1 to < 1.33 marginal, ≥ 1.33 capable', () => {
		// SAS/QC doc guidance, docs/REFERENCES.md B4 [S]: Cp < 1 not adequate (Ekvall & Juran); ≥ 1.33 (Montgomery)
		expect(capabilityVerdict(0.99).level).toBe('not_capable');
		expect(capabilityVerdict(1).level).toBe('marginal');
		expect(capabilityVerdict(1.329).level).toBe('marginal');
		expect(capabilityVerdict(1.33).level).toBe('capable');
		expect(capabilityVerdict(null).level).toBe('unknown');
		expect(capabilityVerdict(0.5).text).toBe('Not capable: Cpk 0.50 is below 1; expect parts outside the limits.');
	});
});

group('capability (within σ = MR̄/1.128, overall σ = s)', () => {
	it('alternating 10, 11, … (n = 10), limits 7…14: within and overall σ differ as they should', () => {
		// Hand computation [C]: x̄ = 10.5, MR̄ = 1, σ_within = 1/1.128, s = √(2.5/9);
		// d2 = 1.128 from docs/REFERENCES.md B5; Cp = 7/(6σ), Cpk = min(14 − 10.5, 10.5 − 7)/(3σ)
		const xs = [10, 11, 10, 11, 10, 11, 10, 11, 10, 11];
		const r = capability(xs, { lsl: 7, usl: 14 });
		const sw = 1 / 1.128;
		const so = Math.sqrt(2.5 / 9);
		expect(r.n).toBe(10);
		expect(r.mean).toBe(10.5);
		expect(r.sdWithin as number).toBeCloseTo(sw, 14);
		expect(r.sdOverall as number).toBeCloseTo(so, 14);
		expect(r.cp as number).toBeCloseTo(7 / (6 * sw), 12);
		expect(r.cpk as number).toBeCloseTo(3.5 / (3 * sw), 12);
		expect(r.pp as number).toBeCloseTo(7 / (6 * so), 12);
		expect(r.ppk as number).toBeCloseTo(3.5 / (3 * so), 12);
		expect(r.verdict.level).toBe('marginal'); // Cpk 1.316
	});
	it('upper limit only: Cp and Pp null, Cpk = Cpu', () => {
		// SAS/QC docs (docs/REFERENCES.md B4 [S]); same data as above [C]
		const r = capability([10, 11, 10, 11, 10, 11, 10, 11, 10, 11], { usl: 14 });
		expect(r.cp).toBeNull();
		expect(r.pp).toBeNull();
		expect(r.cpk).toBe(r.cpu);
		expect(r.cpl).toBeNull();
	});
	it('n = 0, n = 1, no limits and no variation all give null indices and an "unknown" verdict', () => {
		// STYLE.md §2.6
		expect(capability([], { lsl: 1, usl: 2 }).cpk).toBeNull();
		const one = capability([1.5], { lsl: 1, usl: 2 });
		expect(one.sdWithin).toBeNull();
		expect(one.verdict.level).toBe('unknown');
		expect(capability([1, 2, 3], {}).verdict.text).toBe('No limits are set, so capability cannot be judged.');
		const flat = capability([1.5, 1.5, 1.5], { lsl: 1, usl: 2 });
		expect(flat.cp).toBeNull();
		expect(flat.verdict.level).toBe('unknown');
	});
});

group('Shewhart constants (docs/REFERENCES.md B5)', () => {
	// d2, d3 to 4 decimals: docs/REFERENCES.md B5 [C], equal to the R SixSigma vignette [S].
	const d2d3: Record<number, [number, number]> = {
		2: [1.1284, 0.8525],
		3: [1.6926, 0.8884],
		4: [2.0588, 0.8798],
		5: [2.3259, 0.8641],
		6: [2.5344, 0.848],
		7: [2.7044, 0.8332],
		8: [2.8472, 0.8198],
		9: [2.97, 0.8078],
		10: [3.0775, 0.7971]
	};
	it('A2 = 3/(d2√n), D3 = max(0, 1 − 3d3/d2), D4 = 1 + 3d3/d2 reproduce the printed table to 1e-3', () => {
		// Formulas: SAS/QC "Deriving Control Chart Constants" [S]; tolerance 1e-3 because printed tables
		// round from rounded d2/d3 (docs/REFERENCES.md B5 note on D4, n = 3)
		for (const [key, c] of Object.entries(CONTROL_CHART_CONSTANTS)) {
			const n = Number(key);
			const [d2, d3] = d2d3[n];
			expect(Math.abs(c.d2 - d2)).toBeLessThanOrEqual(1e-3);
			expect(Math.abs(c.A2 - 3 / (d2 * Math.sqrt(n)))).toBeLessThanOrEqual(1e-3);
			expect(Math.abs(c.D3 - Math.max(0, 1 - (3 * d3) / d2))).toBeLessThanOrEqual(1e-3);
			expect(Math.abs(c.D4 - (1 + (3 * d3) / d2))).toBeLessThanOrEqual(1e-3);
		}
		expect(Object.keys(CONTROL_CHART_CONSTANTS).map(Number)).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10]);
	});
	it('individuals chart: E2 = 3/d2 = 2.66 and MR-chart D4 = 3.267 for span 2', () => {
		// docs/REFERENCES.md B5: E2 = 3/d2 = 2.6587 exact, printed 2.66 (2 decimals, so tolerance 5e-3);
		// vendor "Control Chart Line Constants" table row "1 | 2.660 | … | 3.267" [S]
		expect(Math.abs(E2_MR - 3 / 1.1284)).toBeLessThanOrEqual(5e-3);
		expect(D4_MR).toBe(3.267);
	});
});
