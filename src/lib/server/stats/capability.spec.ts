import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import { describe as group, expect, it } from 'vitest';
import { generateDemo } from '../demo/generate';
import {
	averageMovingRange,
	bissellInterval,
	capability,
	capabilityIndices,
	capabilityVerdict,
	CONTROL_CHART_CONSTANTS,
	D4_MR,
	E2_MR,
	nearBound,
	observedIndex,
	observedOutside,
	percentileCapability,
	predictedOutside
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
		// Cpk 1.316 alone would be marginal; Bissell's interval on 10 readings (0.67–1.96) reaches
		// below 1, so the verdict is read at its lower end and says it is not sure.
		expect(r.modelIndexName).toBe('Cpk');
		expect(r.verdict).toMatchObject({ level: 'not_capable', sure: false, basis: 'model' });
		expect(r.verdict.text).toMatch(/^Not enough readings to be sure: Cpk 1\.32 \(95 % interval 0\.67–1\.96\) from 10 readings/);
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

group('Bissell (1990) interval for Cpk', () => {
	it('Cpk ± 1.96·√(1/(9n) + Cpk²/(2(n − 1))): n = 45, Cpk 1.15 → 0.89 to 1.41', () => {
		// Formula: Bissell (1990) Applied Statistics 39:331 [M], printed as Cpk[1 ± 1.96√(1/(9n·Cpk²) + 1/(2(n − 1)))]
		// in Rodriguez (1992) J. Quality Technology 24:176 [S] (stored scan); worked example n = 45, Cpk 1.15 →
		// "between 0.89 and 1.41" [S] Quality Digest, May 2000, "The Last Word" (qualitydigest.com/may00/html/lastword.html)
		const ci = bissellInterval(1.15, 45) as { lower: number; upper: number };
		expect(ci.lower).toBeCloseTo(0.89, 2);
		expect(ci.upper).toBeCloseTo(1.41, 2);
		expect(ci.upper - ci.lower).toBeCloseTo(2 * 1.959964 * Math.sqrt(1 / 405 + 1.3225 / 88), 12);
		expect(bissellInterval(1.15, 1)).toBeNull();
		expect(bissellInterval(null, 45)).toBeNull();
	});
});

group('percentile capability (ISO 22514-2, Clements)', () => {
	it('x = 0…10000: X0.135 = 13.5, X50 = 5000, X99.865 = 9986.5; limits −1000…12000', () => {
		// Constructed sample [C]: type-7 quantiles of 0…10000 are exactly 10000·p. ISO 22514-2 / Clements (1989) [M]:
		// Cp = (USL − LSL)/(X99.865 − X0.135), Cpu = (USL − X50)/(X99.865 − X50), Cpl = (X50 − LSL)/(X50 − X0.135)
		const xs = Array.from({ length: 10001 }, (_, i) => i);
		const r = percentileCapability(xs, { lsl: -1000, usl: 12000 })!;
		expect(r).toMatchObject({ p00135: 13.5, p50: 5000, p99865: 9986.5 });
		expect(r.cp as number).toBeCloseTo(13000 / 9973, 12);
		expect(r.cpu as number).toBeCloseTo(7000 / 4986.5, 12);
		expect(r.cpl as number).toBeCloseTo(6000 / 4986.5, 12);
		expect(r.cpk).toBe(r.cpl);
		expect(percentileCapability([5], { lsl: 1 })).toBeNull();
	});
});

group('observed and predicted share outside', () => {
	it('counts strictly outside; the implied index is −Φ⁻¹(share)/3 of the worse side', () => {
		// Φ⁻¹(0.00135) = −3.0000 and Φ⁻¹(3.17e-5) = −4.0 [C], so 0.135 % ↔ 1.00 and 31.7 ppm ↔ 1.33
		const o = observedOutside([1, 2, 2, 3, 9, 10, 11], { lsl: 2, usl: 10 });
		expect(o).toEqual({ below: 1, above: 1, count: 2, share: 2 / 7 });
		expect(observedIndex({ below: 135, above: 0, count: 135, share: 0.00135 }, 100000) as number).toBeCloseTo(1, 3);
		expect(observedIndex({ below: 0, above: 0, count: 0, share: 0 }, 100)).toBeNull();
		// every reading outside: finite, taken as 99.5 of 100 (−Φ⁻¹(0.995)/3 = −0.8586) [C]
		expect(observedIndex({ below: 100, above: 0, count: 100, share: 1 }, 100) as number).toBeCloseTo(-0.8586, 4);
		// a normal (16, 2) against 8…20: Φ(−4) + Φ(−2) [C]
		const p = predictedOutside(16, 2, { lsl: 8, usl: 20 });
		expect(p.below as number).toBeCloseTo(3.167124183e-5, 12);
		expect(p.above as number).toBeCloseTo(0.02275013195, 10);
	});
	it('a bound within 3 SDs of the mean makes the data bounded', () => {
		// Definition (ours): the normal fit puts more than Φ(−3) = 0.135 % past a value the quantity cannot pass
		expect(nearBound(97.8, 3.4, { min: 0, max: 100 })).toMatchObject({ side: 'max', value: 100 });
		expect(nearBound(0.045, 0.005, { min: 0, max: null })).toBeNull();
		expect(nearBound(0.02, 0.015, { min: 0, max: null })).toMatchObject({ side: 'min' });
	});
});

group('the verdict takes the worse of the model and what happened', () => {
	it('normal data, 3,000 readings, Cpk about 1.5: capable and sure', () => {
		// Deterministic normal scores Φ⁻¹((i − 0.5)/n), interleaved so that moving ranges reflect the spread [C]
		const n = 3000;
		const xs = shuffled(Array.from({ length: n }, (_, i) => 10 + phiInv((i + 0.5) / n)));
		const r = capability(xs, { lsl: 5.5, usl: 14.5 });
		expect(r.method).toBe('normal');
		expect(r.normality.rejected).toBe(false);
		expect(r.ppk as number).toBeCloseTo(1.5, 2);
		expect(r.verdict).toMatchObject({ level: 'capable', sure: true });
		expect(r.observed.count).toBe(0);
	});
	it('the demo’s ALDER-4 exhaust vacuum hold (final): 85 of 3,533 below 90 % is not capable, whatever Cpk 1.24 says', () => {
		// The full demo as seeded on 2026-12-03 (generateDemo, 3000 heads; the figures move with the end date), the final vacuum hold of ALDER-4's exhaust valves in time order;
		// the limit is the shop's vacuumHoldPassPct = 90 (at least). The example: Cpk 1.24, 85 of 3,533 below.
		const d = generateDemo({ endDate: '2026-12-03' });
		const fam = new Set(d.families.filter((f) => f.code === 'ALDER-4').map((f) => f.id));
		const rows = [...d.readings()].filter((r) => fam.has(r.familyId) && r.side === 'exhaust' && r.measurement === 'vacuum_hold' && r.stage === 'final');
		rows.sort((a, b) => Date.parse(a.measuredAt) - Date.parse(b.measuredAt)); // stable: ties keep the order the generator gave them (their ids')
		const r = capability(
			rows.map((x) => Number(x.value)),
			{ lsl: 90 },
			{ bounds: { min: 0, max: 100 } }
		);
		expect(r.n).toBe(3533);
		expect(r.observed).toMatchObject({ below: 85, above: 0, count: 85 });
		expect(r.observed.share as number).toBeCloseTo(0.0241, 4);
		expect(r.cpk as number).toBeCloseTo(1.24, 2);
		expect(r.ppk as number).toBeCloseTo(0.76, 2);
		expect(r.observedIndex as number).toBeCloseTo(0.66, 2);
		expect(r.normality.rejected).toBe(true);
		expect(r.nearBound).toMatchObject({ side: 'max', value: 100 });
		expect(r.method).toBe('percentile');
		expect(r.percentile).toMatchObject({ p00135: 71, p50: 98.5, p99865: 100 });
		expect(r.verdict.level).toBe('not_capable');
		expect(r.verdict.index as number).toBeLessThanOrEqual(r.observedIndex as number);
		expect(r.verdict.text).toContain('85 of 3,533 readings (2.4 %) are outside the limits');
	}, 60_000);
	it('a model index above the observed one gives way to it', () => {
		// [C] 1,000 readings 0…999 normal scores, shuffled, with 10 set just below the lower limit
		const n = 1000;
		const xs = shuffled(Array.from({ length: n }, (_, i) => 50 + phiInv((i + 0.5) / n)));
		for (let i = 0; i < 10; i++) xs[i * 97] = 44.9;
		const r = capability(xs, { lsl: 45, usl: 55 });
		expect(r.observed.below).toBe(10);
		expect(r.verdict.basis).toBe('observed');
		expect(r.verdict.level).toBe('not_capable');
		expect(r.verdict.text).toMatch(/^Not capable: 10 of 1,000 readings \(1\.0 %\) are outside the limits, as many as an index of 0\.78 would give/);
	});
});

function phiInv(p: number): number {
	return normalQuantile(p, 0, 1);
}

/** A fixed shuffle (Fisher–Yates over a 32-bit LCG), so consecutive readings are unrelated as in a steady process. */
function shuffled(xs: number[]): number[] {
	let seed = 12345;
	const out = [...xs];
	for (let i = out.length - 1; i > 0; i--) {
		seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
		const j = seed % (i + 1);
		[out[i], out[j]] = [out[j], out[i]];
	}
	return out;
}
