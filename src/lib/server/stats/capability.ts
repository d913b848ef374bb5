// Process capability (Cp, Cpk, Pp, Ppk) and individuals / moving-range control charts.
//
// Definitions follow the NIST/SEMATECH e-Handbook §6.1.6 and the SAS/QC documentation:
// Cp = (USL − LSL)/6σ, Cpu = (USL − x̄)/3σ, Cpl = (x̄ − LSL)/3σ, Cpk = min(Cpu, Cpl).
// Cp/Cpk use the within (short-term) σ̂ = MR̄/d2 with d2 = 1.128 for moving ranges of two
// consecutive readings; Pp/Ppk use the overall sample standard deviation s.

import { momentsOf, momentsToSummary } from './summary';
import { finiteArray, type Values } from './input';

/**
 * Shewhart control-chart constants for subgroup size n = 2…10, to 3 decimals.
 * Source: the standard table of ASTM E2587, Montgomery "Introduction to Statistical Quality
 * Control" Appendix VI and NIST e-Handbook §6.3.2, as read in a SCADA vendor's
 * "Control Chart Line Constants" documentation page and the R SixSigma vignette "Shewhart Constants for
 * Control Charts" (docs/REFERENCES.md B5). A2 = 3/(d2√n), D3 = max(0, 1 − 3d3/d2), D4 = 1 + 3d3/d2.
 */
export const CONTROL_CHART_CONSTANTS: Readonly<
	Record<2 | 3 | 4 | 5 | 6 | 7 | 8 | 9 | 10, { A2: number; D3: number; D4: number; d2: number }>
> = Object.freeze({
	2: { A2: 1.88, D3: 0, D4: 3.267, d2: 1.128 },
	3: { A2: 1.023, D3: 0, D4: 2.574, d2: 1.693 },
	4: { A2: 0.729, D3: 0, D4: 2.282, d2: 2.059 },
	5: { A2: 0.577, D3: 0, D4: 2.114, d2: 2.326 },
	6: { A2: 0.483, D3: 0, D4: 2.004, d2: 2.534 },
	7: { A2: 0.419, D3: 0.076, D4: 1.924, d2: 2.704 },
	8: { A2: 0.373, D3: 0.136, D4: 1.864, d2: 2.847 },
	9: { A2: 0.337, D3: 0.184, D4: 1.816, d2: 2.97 },
	10: { A2: 0.308, D3: 0.223, D4: 1.777, d2: 3.078 }
});

/** d2 for moving ranges of span 2. */
export const D2_MR = CONTROL_CHART_CONSTANTS[2].d2;
/** E2 = 3/d2 for individuals charts: 2.6587 with exact d2, printed and used as 2.66. */
export const E2_MR = 2.66;
/** D4 for n = 2: the moving-range chart's upper limit factor. */
export const D4_MR = CONTROL_CHART_CONSTANTS[2].D4;

/** Cpk thresholds from the SAS/QC documentation's guidance (Ekvall & Juran; Montgomery). */
export const CAPABLE_CPK = 1.33;
export const MARGINAL_CPK = 1;

export interface SpecLimits {
	lsl?: number | null;
	usl?: number | null;
}

export interface CapabilityIndices {
	/** Needs both limits. */
	cp: number | null;
	/** Needs the upper limit. */
	cpu: number | null;
	/** Needs the lower limit. */
	cpl: number | null;
	/** min(cpu, cpl) of those available. */
	cpk: number | null;
}

export type CapabilityLevel = 'capable' | 'marginal' | 'not_capable' | 'unknown';

export interface CapabilityVerdict {
	level: CapabilityLevel;
	text: string;
}

export interface CapabilityResult {
	n: number;
	mean: number | null;
	/** MR̄/1.128 from consecutive readings in time order. */
	sdWithin: number | null;
	/** Sample standard deviation (n − 1). */
	sdOverall: number | null;
	cp: number | null;
	cpk: number | null;
	cpu: number | null;
	cpl: number | null;
	pp: number | null;
	ppk: number | null;
	verdict: CapabilityVerdict;
}

function limitsOf(limits: SpecLimits): { lsl: number | null; usl: number | null } {
	const lsl = limits.lsl ?? null;
	const usl = limits.usl ?? null;
	for (const v of [lsl, usl]) {
		if (v !== null && !Number.isFinite(v)) throw new RangeError('spec limits must be finite numbers');
	}
	if (lsl !== null && usl !== null && !(lsl < usl)) {
		throw new RangeError(`lower limit (${lsl}) must be below upper limit (${usl})`);
	}
	return { lsl, usl };
}

/**
 * Capability indices from a mean and a σ estimate. One-sided limits give a null Cp and the
 * applicable one-sided index as Cpk. A σ of 0 or null leaves every index null.
 */
export function capabilityIndices(mean: number | null, sd: number | null, limits: SpecLimits): CapabilityIndices {
	const { lsl, usl } = limitsOf(limits);
	if (mean === null || sd === null || !(sd > 0)) return { cp: null, cpu: null, cpl: null, cpk: null };
	const cp = lsl !== null && usl !== null ? (usl - lsl) / (6 * sd) : null;
	const cpu = usl !== null ? (usl - mean) / (3 * sd) : null;
	const cpl = lsl !== null ? (mean - lsl) / (3 * sd) : null;
	const sides = [cpu, cpl].filter((v): v is number => v !== null);
	return { cp, cpu, cpl, cpk: sides.length > 0 ? Math.min(...sides) : null };
}

/** Mean of |x_i − x_{i−1}| over consecutive readings; null for fewer than two readings. */
export function averageMovingRange(values: Values): number | null {
	const x = finiteArray(values);
	if (x.length < 2) return null;
	let sum = 0;
	for (let i = 1; i < x.length; i++) sum += Math.abs(x[i] - x[i - 1]);
	return sum / (x.length - 1);
}

function fmt2(x: number): string {
	return x.toFixed(2);
}

/** Plain-words verdict on a Cpk: < 1 not capable, 1–1.33 marginal, ≥ 1.33 capable. */
export function capabilityVerdict(cpk: number | null, reason?: string): CapabilityVerdict {
	if (cpk === null) {
		return { level: 'unknown', text: reason ?? 'Capability cannot be judged from these readings.' };
	}
	if (cpk >= CAPABLE_CPK) {
		return { level: 'capable', text: `Capable: Cpk ${fmt2(cpk)} is at least ${CAPABLE_CPK}.` };
	}
	if (cpk >= MARGINAL_CPK) {
		return {
			level: 'marginal',
			text: `Marginal: Cpk ${fmt2(cpk)} is between ${MARGINAL_CPK} and ${CAPABLE_CPK}; the process barely fits the limits.`
		};
	}
	return {
		level: 'not_capable',
		text: `Not capable: Cpk ${fmt2(cpk)} is below ${MARGINAL_CPK}; expect parts outside the limits.`
	};
}

/**
 * Capability of a series of readings in time order against spec limits. Cp/Cpk use
 * σ_within = MR̄/1.128; Pp/Ppk use the overall sample standard deviation.
 */
export function capability(values: Values, limits: SpecLimits): CapabilityResult {
	const x = finiteArray(values);
	const { lsl, usl } = limitsOf(limits);
	const s = momentsToSummary(momentsOf(x));
	const mrBar = averageMovingRange(x);
	const sdWithin = mrBar === null ? null : mrBar / D2_MR;
	const within = capabilityIndices(s.mean, sdWithin, { lsl, usl });
	const overall = capabilityIndices(s.mean, s.sd, { lsl, usl });
	let reason: string | undefined;
	if (lsl === null && usl === null) reason = 'No limits are set, so capability cannot be judged.';
	else if (x.length < 2) reason = 'At least two readings are needed to judge capability.';
	else if (sdWithin === 0) reason = 'Consecutive readings do not vary, so capability cannot be judged.';
	return {
		n: x.length,
		mean: s.mean,
		sdWithin,
		sdOverall: s.sd,
		cp: within.cp,
		cpk: within.cpk,
		cpu: within.cpu,
		cpl: within.cpl,
		pp: overall.cp,
		ppk: overall.cpk,
		verdict: capabilityVerdict(within.cpk, reason)
	};
}
