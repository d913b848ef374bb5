// Process capability: Cp, Cpk (within σ), Pp, Ppk (overall σ), the observed and predicted share
// outside the limits, the percentile indices (ISO 22514-2) and Bissell's interval, and a verdict
// that takes the worse of the model and what happened. The control-chart constants live here too
// (control.ts uses them).
//
// Definitions follow the NIST/SEMATECH e-Handbook §6.1.6 and the SAS/QC documentation:
// Cp = (USL − LSL)/6σ, Cpu = (USL − x̄)/3σ, Cpl = (x̄ − LSL)/3σ, Cpk = min(Cpu, Cpl).
// Cp/Cpk use the within (short-term) σ̂ = MR̄/d2 with d2 = 1.128 for moving ranges of two
// consecutive readings; Pp/Ppk use the overall sample standard deviation s.

import { histogramSorted, momentsOf, momentsToSummary, quantileType7, type HistogramBin } from './summary';
import { finiteArray, type Values } from './input';
import { andersonDarling, AD_MIN_N, phi, phiInverse, type NormalityTest } from './normality';
import { Z95 } from './rates';

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

/** Which estimate the verdict's index came from. */
export type CapabilityMethod = 'normal' | 'percentile';

export interface CapabilityVerdict {
	level: CapabilityLevel;
	text: string;
	/** The index the level was read from: the model's, or the one the observed share outside implies. */
	basis: 'model' | 'observed' | null;
	/** The index behind the level (the lower of the model's and the observed one). */
	index: number | null;
	/** False when the 95 % interval of the model's index reaches into another level. */
	sure: boolean;
}

/** Readings strictly outside the limits, and their share of all readings. */
export interface ObservedOutside {
	below: number;
	above: number;
	count: number;
	share: number | null;
}

/** The share a normal with the sample mean and overall SD puts outside the limits. */
export interface PredictedOutside {
	below: number | null;
	above: number | null;
	share: number | null;
}

/** 95 % confidence interval of a Cpk (Bissell 1990). */
export interface IndexInterval {
	lower: number;
	upper: number;
}

/** ISO 22514-2 percentile (Clements) capability from the 0.135 %, 50 % and 99.865 % quantiles. */
export interface PercentileCapability {
	p00135: number;
	p50: number;
	p99865: number;
	cp: number | null;
	cpu: number | null;
	cpl: number | null;
	cpk: number | null;
}

/** A physical bound within 3 overall SDs of the mean: the normal fit spills past it. */
export interface NearBound {
	side: 'min' | 'max';
	value: number;
	/** |mean − bound| / SD. */
	sds: number;
}

export interface FitPoint {
	x: number;
	/** Readings a normal (mean, overall SD) expects per histogram bin width at x. */
	count: number;
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
	cpkInterval: IndexInterval | null;
	ppkInterval: IndexInterval | null;
	observed: ObservedOutside;
	/** −Φ⁻¹(share)/3 of the worse side's observed share; null when no reading is outside. */
	observedIndex: number | null;
	predicted: PredictedOutside;
	normality: NormalityTest;
	nearBound: NearBound | null;
	percentile: PercentileCapability | null;
	/** The estimate the verdict used, and why. */
	method: CapabilityMethod;
	methodReason: string;
	/** The model index the verdict weighed: min(Cpk, Ppk) for the normal method, the percentile Cpk otherwise. */
	modelIndex: number | null;
	modelIndexName: 'Cpk' | 'Ppk' | 'percentile Cpk' | null;
	modelInterval: IndexInterval | null;
	verdict: CapabilityVerdict;
	histogram: HistogramBin[];
	fit: FitPoint[];
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

/** The level an index falls in: < 1 not capable, 1 to < 1.33 marginal, ≥ 1.33 capable. */
export function capabilityLevel(index: number | null): CapabilityLevel {
	if (index === null) return 'unknown';
	if (index >= CAPABLE_CPK) return 'capable';
	if (index >= MARGINAL_CPK) return 'marginal';
	return 'not_capable';
}

/** Plain-words verdict on a Cpk alone: < 1 not capable, 1–1.33 marginal, ≥ 1.33 capable. */
export function capabilityVerdict(cpk: number | null, reason?: string): CapabilityVerdict {
	const base = { basis: cpk === null ? null : ('model' as const), index: cpk, sure: cpk !== null };
	if (cpk === null) {
		return { level: 'unknown', text: reason ?? 'Capability cannot be judged from these readings.', ...base };
	}
	const level = capabilityLevel(cpk);
	if (level === 'capable') return { level, text: `Capable: Cpk ${fmt2(cpk)} is at least ${CAPABLE_CPK}.`, ...base };
	if (level === 'marginal') {
		return { level, text: `Marginal: Cpk ${fmt2(cpk)} is between ${MARGINAL_CPK} and ${CAPABLE_CPK}; the process barely fits the limits.`, ...base };
	}
	return { level, text: `Not capable: Cpk ${fmt2(cpk)} is below ${MARGINAL_CPK}; expect parts outside the limits.`, ...base };
}

/**
 * Bissell's (1990) approximate 95 % interval for Cpk from n readings:
 * Cpk ± z·√(1/(9n) + Cpk²/(2(n − 1))), z = 1.959964. Null for n < 2 or no Cpk.
 */
export function bissellInterval(cpk: number | null, n: number, z: number = Z95): IndexInterval | null {
	if (cpk === null || n < 2) return null;
	const half = z * Math.sqrt(1 / (9 * n) + (cpk * cpk) / (2 * (n - 1)));
	return { lower: cpk - half, upper: cpk + half };
}

/** Readings strictly below the lower or above the upper limit. */
export function observedOutside(values: readonly number[], limits: SpecLimits): ObservedOutside {
	const { lsl, usl } = limitsOf(limits);
	let below = 0;
	let above = 0;
	for (const v of values) {
		if (lsl !== null && v < lsl) below++;
		else if (usl !== null && v > usl) above++;
	}
	const n = values.length;
	return { below, above, count: below + above, share: n > 0 && (lsl !== null || usl !== null) ? (below + above) / n : null };
}

/**
 * The index an observed share outside one limit implies: the Cpk whose normal tail beyond that
 * limit equals the share, −Φ⁻¹(share)/3 (0.135 % ↔ 1.00, 31.7 ppm ↔ 1.33). The worse side
 * counts; a side without a reading outside does not lower it (null when neither has one).
 */
export function observedIndex(o: ObservedOutside, n: number): number | null {
	// Every reading outside one limit would make −Φ⁻¹(1) infinite: take it as n − ½ of n, a finite worst case.
	const sides = [o.below, o.above].filter((k) => k > 0).map((k) => -phiInverse(Math.min(k, n - 0.5) / n) / 3);
	return sides.length > 0 ? Math.min(...sides) : null;
}

/** The share outside the limits a normal with this mean and SD predicts. */
export function predictedOutside(mean: number | null, sd: number | null, limits: SpecLimits): PredictedOutside {
	const { lsl, usl } = limitsOf(limits);
	if (mean === null || sd === null || !(sd > 0) || (lsl === null && usl === null)) return { below: null, above: null, share: null };
	const below = lsl === null ? null : phi((lsl - mean) / sd);
	const above = usl === null ? null : phi((mean - usl) / sd);
	return { below, above, share: (below ?? 0) + (above ?? 0) };
}

/**
 * Percentile capability (ISO 22514-2; Clements 1989) from sorted values: Cp = (USL − LSL)/(X99.865 − X0.135),
 * Cpu = (USL − X50)/(X99.865 − X50), Cpl = (X50 − LSL)/(X50 − X0.135), Cpk = min. The quantiles are the
 * sample's own (Hyndman & Fan type 7): below 1/0.00135 ≈ 741 readings they lie at the extreme readings,
 * so the spread they give is a lower bound. Null for fewer than 2 values.
 */
export function percentileCapability(sorted: readonly number[], limits: SpecLimits): PercentileCapability | null {
	const { lsl, usl } = limitsOf(limits);
	if (sorted.length < 2) return null;
	const p00135 = quantileType7(sorted, 0.00135) as number;
	const p50 = quantileType7(sorted, 0.5) as number;
	const p99865 = quantileType7(sorted, 0.99865) as number;
	const ratio = (num: number, den: number) => (den > 0 ? num / den : null);
	const cp = lsl !== null && usl !== null ? ratio(usl - lsl, p99865 - p00135) : null;
	const cpu = usl !== null ? ratio(usl - p50, p99865 - p50) : null;
	const cpl = lsl !== null ? ratio(p50 - lsl, p50 - p00135) : null;
	const sides = [cpu, cpl].filter((v): v is number => v !== null);
	return { p00135, p50, p99865, cp, cpu, cpl, cpk: sides.length > 0 ? Math.min(...sides) : null };
}

/**
 * Fewest readings the percentile method is used on. Its 0.135 % and 99.865 % quantiles come from
 * the readings themselves; on fewer than about a hundred they are the extreme readings, and the
 * spread they give says little (ours, a judgement: ISO 22514-2 asks for "enough" data).
 */
export const PERCENTILE_MIN_N = 100;

/** Normal fits within this many SDs of a physical bound spill more than 0.135 % past it. */
export const NEAR_BOUND_SDS = 3;

/** The physical bound nearest the mean in SDs, when it is within 3 SDs. */
export function nearBound(mean: number | null, sd: number | null, bounds: PhysicalBounds | undefined): NearBound | null {
	if (!bounds || mean === null || sd === null || !(sd > 0)) return null;
	const near = (
		[
			['min', bounds.min],
			['max', bounds.max]
		] as const
	)
		.filter((b): b is ['min' | 'max', number] => b[1] !== null && b[1] !== undefined)
		.map(([side, value]) => ({ side, value, sds: Math.abs(mean - value) / sd }))
		.filter((b) => b.sds < NEAR_BOUND_SDS)
		.sort((a, b) => a.sds - b.sds);
	return near[0] ?? null;
}

const FIT_POINTS = 81;

/** The normal (mean, sd) density scaled to readings per bin width over the histogram and the limits. */
function fitCurve(n: number, mean: number | null, sd: number | null, bins: HistogramBin[], limits: { lsl: number | null; usl: number | null }): FitPoint[] {
	if (mean === null || sd === null || !(sd > 0) || bins.length === 0) return [];
	const width = bins[0].x1 - bins[0].x0;
	if (!(width > 0)) return [];
	const lo = Math.min(bins[0].x0, limits.lsl ?? Infinity, mean - 3 * sd);
	const hi = Math.max(bins[bins.length - 1].x1, limits.usl ?? -Infinity, mean + 3 * sd);
	const scale = (n * width) / (sd * Math.sqrt(2 * Math.PI));
	return Array.from({ length: FIT_POINTS }, (_, i) => {
		const x = lo + ((hi - lo) * i) / (FIT_POINTS - 1);
		const z = (x - mean) / sd;
		return { x, count: scale * Math.exp(-0.5 * z * z) };
	});
}

export interface PhysicalBounds {
	min: number | null;
	max: number | null;
}

export interface CapabilityOptions {
	/** Bounds the quantity cannot pass (MEASUREMENT_INFO[m].bounds). */
	bounds?: PhysicalBounds;
}

const LEVEL_WORD: Record<Exclude<CapabilityLevel, 'unknown'>, string> = { capable: 'Capable', marginal: 'Marginal', not_capable: 'Not capable' };
const pct = (x: number) => (x === 0 ? '0 %' : `${(x * 100).toFixed(x < 0.001 ? 3 : x < 0.01 ? 2 : 1)} %`);
const int = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0 });

/**
 * The verdict: the worse of the model's index and the index the observed share outside implies,
 * read at the lower end of the model index's 95 % interval (so 12 readings cannot pass for 3,000).
 * `sure` is false when the interval reaches into another level.
 */
function judge(r: Omit<CapabilityResult, 'verdict'>, reason: string | undefined): CapabilityVerdict {
	if (reason) return { level: 'unknown', text: reason, basis: null, index: null, sure: false };
	const model = r.modelIndex;
	const obs = r.observedIndex;
	if (model === null && obs === null) return { level: 'unknown', text: 'Capability cannot be judged from these readings.', basis: null, index: null, sure: false };
	const lowerModel = r.modelInterval?.lower ?? model;
	const upperModel = r.modelInterval?.upper ?? model;
	const worse = (m: number | null) => (obs !== null && (m === null || obs < m) ? { basis: 'observed' as const, index: obs } : { basis: 'model' as const, index: m as number });
	const atLower = worse(lowerModel);
	const atPoint = worse(model);
	const level = capabilityLevel(atLower.index);
	const sure = level === capabilityLevel(worse(upperModel).index);
	const out = `${int.format(r.observed.count)} of ${int.format(r.n)} readings (${pct(r.observed.share ?? 0)}) are outside the limits`;
	const predicted = r.predicted.share === null ? '' : `; a normal model predicts ${pct(r.predicted.share)}`;
	const interval = r.modelInterval ? ` (95 % interval ${fmt2(r.modelInterval.lower)}–${fmt2(r.modelInterval.upper)})` : '';
	const modelText = model === null ? '' : `${r.modelIndexName} ${fmt2(model)}${interval}`;
	let text: string;
	if (atPoint.basis === 'observed') {
		text = `${LEVEL_WORD[level as keyof typeof LEVEL_WORD]}: ${out}, as many as an index of ${fmt2(obs as number)} would give — worse than the model's ${modelText || 'index'}${predicted}.`;
	} else if (!sure) {
		text = `Not enough readings to be sure: ${modelText} from ${int.format(r.n)} readings; judged at its lower end, ${fmt2(atLower.index)}. ${out}${predicted}.`;
	} else {
		text = `${LEVEL_WORD[level as keyof typeof LEVEL_WORD]}: ${modelText}; ${out}${predicted}.`;
	}
	return { level, text, basis: atLower.basis, index: atLower.index, sure };
}

/**
 * Capability of a series of readings in time order against spec limits. Cp/Cpk use
 * σ_within = MR̄/1.128; Pp/Ppk use the overall sample standard deviation. Beside them: the
 * observed and the predicted share outside, the Anderson–Darling test, and the percentile
 * indices, which the verdict uses when the readings fail the test (p < 0.05) or sit within
 * 3 SDs of a physical bound.
 */
export function capability(values: Values, limits: SpecLimits, options: CapabilityOptions = {}): CapabilityResult {
	const x = finiteArray(values);
	const { lsl, usl } = limitsOf(limits);
	const s = momentsToSummary(momentsOf(x));
	const mrBar = averageMovingRange(x);
	const sdWithin = mrBar === null ? null : mrBar / D2_MR;
	const within = capabilityIndices(s.mean, sdWithin, { lsl, usl });
	const overall = capabilityIndices(s.mean, s.sd, { lsl, usl });
	const sorted = Array.from(Float64Array.from(x).sort());
	const normality = andersonDarling(x);
	const bound = nearBound(s.mean, s.sd, options.bounds);
	const observed = observedOutside(x, { lsl, usl });
	const percentile = percentileCapability(sorted, { lsl, usl });
	const wantPercentile = normality.rejected === true || (normality.rejected !== null && bound !== null);
	const usePercentile = wantPercentile && x.length >= PERCENTILE_MIN_N && percentile !== null && percentile.cpk !== null;
	const method: CapabilityMethod = usePercentile ? 'percentile' : 'normal';
	let methodReason: string;
	if (usePercentile) {
		const why = [normality.rejected ? 'the readings fail the Anderson–Darling test of normality (p < 0.05)' : null, bound ? `the mean is within ${NEAR_BOUND_SDS} SDs of the physical ${bound.side === 'max' ? 'upper' : 'lower'} bound ${bound.value}` : null].filter(Boolean);
		const thin = x.length < 1 / 0.00135 ? ` On ${x.length} readings the 0.135 % and 99.865 % points lie at the extreme readings, so the spread may be understated.` : '';
		methodReason = `Percentile method (ISO 22514-2): ${why.join(' and ')}.${thin}`;
	} else if (wantPercentile) {
		methodReason = `Normal method: the readings ${normality.rejected ? 'fail the normality test' : 'sit near a physical bound'}, but ${x.length} readings are too few for the percentile method (at least ${PERCENTILE_MIN_N}); judge with care.`;
	} else if (normality.rejected === null) {
		methodReason = `Normal method: fewer than ${AD_MIN_N} readings to test normality, so the normal indices are used as they are.`;
	} else {
		methodReason = 'Normal method: the readings pass the Anderson–Darling test of normality and no physical bound is near.';
	}
	let modelIndex: number | null;
	let modelIndexName: CapabilityResult['modelIndexName'];
	if (usePercentile) {
		modelIndex = percentile.cpk;
		modelIndexName = 'percentile Cpk';
	} else if (within.cpk !== null && (overall.cpk === null || within.cpk <= overall.cpk)) {
		modelIndex = within.cpk;
		modelIndexName = 'Cpk';
	} else {
		modelIndex = overall.cpk;
		modelIndexName = overall.cpk === null ? null : 'Ppk';
	}
	let reason: string | undefined;
	if (lsl === null && usl === null) reason = 'No limits are set, so capability cannot be judged.';
	else if (x.length < 2) reason = 'At least two readings are needed to judge capability.';
	else if (sdWithin === 0) reason = 'Consecutive readings do not vary, so capability cannot be judged.';
	const histogram = histogramSorted(sorted);
	const base: Omit<CapabilityResult, 'verdict'> = {
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
		cpkInterval: bissellInterval(within.cpk, x.length),
		ppkInterval: bissellInterval(overall.cpk, x.length),
		observed,
		observedIndex: observedIndex(observed, x.length),
		predicted: predictedOutside(s.mean, s.sd, { lsl, usl }),
		normality,
		nearBound: bound,
		percentile,
		method,
		methodReason,
		modelIndex: reason ? null : modelIndex,
		modelIndexName: reason ? null : modelIndexName,
		// Bissell's interval is for the normal Cpk; for the percentile Cpk it is used as an approximation of the same width.
		modelInterval: reason ? null : bissellInterval(modelIndex, x.length),
		histogram,
		fit: fitCurve(x.length, s.mean, s.sd, histogram, { lsl, usl })
	};
	return { ...base, verdict: judge(base, reason) };
}
