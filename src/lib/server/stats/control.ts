// Individuals / moving-range (I-MR) control charts (NIST/SEMATECH e-Handbook §6.3.2; constants in
// capability.ts with their sources).

import { momentsOf, momentsToSummary } from './summary';
import { averageMovingRange, D2_MR, D4_MR, E2_MR } from './capability';

export interface ControlPoint<T extends number | Date = number | Date> {
	t: T;
	value: number;
}

export interface ChartPoint<T extends number | Date = number | Date> {
	t: T;
	value: number;
	/** |value − previous value|; null for the first point. */
	mr: number | null;
	/** Position of this point in the input array. */
	sourceIndex: number;
}

export interface ControlChart<T extends number | Date = number | Date> {
	n: number;
	/** x̄, the centre line of the individuals chart. */
	centre: number | null;
	/** x̄ ± 2.66·MR̄. */
	ucl: number | null;
	lcl: number | null;
	/** Average moving range, the centre line of the MR chart. */
	mrBar: number | null;
	/** 3.267·MR̄. */
	mrUcl: number | null;
	/** Always 0 for span-2 moving ranges (D3 = 0). */
	mrLcl: number | null;
	/** Points in time order (stable sort on t). */
	points: ChartPoint<T>[];
	/** Indices into `points` of readings above UCL or below LCL. */
	beyondLimits: number[];
	/** Indices into `points` whose moving range is above the MR UCL. */
	mrBeyondLimits: number[];
}

/**
 * Individuals / moving-range (I-MR) chart. Points are put in time order (stable sort on t);
 * limits: x̄ ± E2·MR̄ with E2 = 2.66, MR chart UCL = D4·MR̄ with D4 = 3.267, LCL 0.
 * A point exactly on a limit is not beyond it.
 */
export function controlChart<T extends number | Date>(input: readonly ControlPoint<T>[]): ControlChart<T> {
	const ordered = input
		.map((p, sourceIndex) => {
			if (!Number.isFinite(p.value)) throw new RangeError(`points[${sourceIndex}].value is not a finite number`);
			const time = +p.t;
			if (!Number.isFinite(time)) throw new RangeError(`points[${sourceIndex}].t is not a valid time`);
			return { p, sourceIndex, time };
		})
		.sort((a, b) => a.time - b.time || a.sourceIndex - b.sourceIndex);
	const points: ChartPoint<T>[] = ordered.map(({ p, sourceIndex }, i) => ({
		t: p.t,
		value: p.value,
		mr: i === 0 ? null : Math.abs(p.value - ordered[i - 1].p.value),
		sourceIndex
	}));
	const values = points.map((p) => p.value);
	const centre = momentsToSummary(momentsOf(values)).mean;
	const mrBar = averageMovingRange(values);
	const ucl = centre !== null && mrBar !== null ? centre + E2_MR * mrBar : null;
	const lcl = centre !== null && mrBar !== null ? centre - E2_MR * mrBar : null;
	const mrUcl = mrBar === null ? null : D4_MR * mrBar;
	const beyondLimits: number[] = [];
	const mrBeyondLimits: number[] = [];
	if (ucl !== null && lcl !== null && mrUcl !== null) {
		points.forEach((p, i) => {
			if (p.value > ucl || p.value < lcl) beyondLimits.push(i);
			if (p.mr !== null && p.mr > mrUcl) mrBeyondLimits.push(i);
		});
	}
	return {
		n: points.length,
		centre,
		ucl,
		lcl,
		mrBar,
		mrUcl,
		mrLcl: mrBar === null ? null : 0,
		points,
		beyondLimits,
		mrBeyondLimits
	};
}

// ---------------------------------------------------------------------------------------------
// Phase I / phase II: limits from a baseline, held while later readings are charted.

/** What a baseline period gives: its size, mean and average moving range. */
export interface BaselineFigures {
	n: number;
	centre: number;
	mrBar: number;
}

/** The figures of a baseline from its readings in time order; null with fewer than two. */
export function baselineFigures(values: readonly number[]): BaselineFigures | null {
	if (values.length < 2) return null;
	const centre = momentsToSummary(momentsOf(values)).mean;
	const mrBar = averageMovingRange(values);
	return centre === null || mrBar === null ? null : { n: values.length, centre, mrBar };
}

/** σ of individuals estimated from the average moving range: MR̄/d2, d2 = 1.128 (n = 2). */
export const sigmaFromMrBar = (mrBar: number): number => mrBar / D2_MR;

export interface ClippedLimits {
	lcl: number;
	ucl: number;
	/** The limits x̄ ± 3σ before clipping. */
	rawLcl: number;
	rawUcl: number;
	lclClipped: boolean;
	uclClipped: boolean;
}

/**
 * x̄ ± 2.66·MR̄, each limit moved to the quantity's physical bound when it lies beyond it (a hold
 * cannot exceed 100 %, a runout cannot be below 0): a limit no reading can reach says nothing.
 */
export function clippedLimits(b: BaselineFigures, bounds: { min: number; max: number | null }): ClippedLimits {
	const rawUcl = b.centre + E2_MR * b.mrBar;
	const rawLcl = b.centre - E2_MR * b.mrBar;
	const lclClipped = rawLcl < bounds.min;
	const uclClipped = bounds.max !== null && rawUcl > bounds.max;
	return { rawLcl, rawUcl, lclClipped, uclClipped, lcl: lclClipped ? bounds.min : rawLcl, ucl: uclClipped ? (bounds.max as number) : rawUcl };
}

// ---------------------------------------------------------------------------------------------
// EWMA (NIST/SEMATECH e-Handbook §6.3.2.4; Roberts, 1959).

/** λ and L: λ between 0.2 and 0.3 is the e-Handbook's usual range; L = 3 its default factor. */
export const EWMA_LAMBDA = 0.2;
export const EWMA_L = 3;

export interface EwmaPoint {
	/** z_t = λ·x_t + (1 − λ)·z_{t−1}, z_0 = μ0. */
	z: number;
	/** μ0 ± L·σ·√(λ/(2 − λ)·(1 − (1 − λ)^{2t})): exact limits, widening to the steady ones. */
	ucl: number;
	lcl: number;
	beyond: boolean;
}

export interface EwmaChart {
	lambda: number;
	L: number;
	centre: number;
	sigma: number;
	/** μ0 ± L·σ·√(λ/(2 − λ)), the limits the exact ones approach (the e-Handbook's). */
	steadyUcl: number;
	steadyLcl: number;
	points: EwmaPoint[];
}

export function ewmaChart(values: readonly number[], mu0: number, sigma: number, lambda = EWMA_LAMBDA, L = EWMA_L): EwmaChart {
	if (!(lambda > 0 && lambda <= 1)) throw new RangeError('lambda must be in (0, 1]');
	const steady = L * sigma * Math.sqrt(lambda / (2 - lambda));
	let z = mu0;
	const points = values.map((x, i) => {
		z = lambda * x + (1 - lambda) * z;
		const half = steady * Math.sqrt(1 - (1 - lambda) ** (2 * (i + 1)));
		return { z, ucl: mu0 + half, lcl: mu0 - half, beyond: z > mu0 + half || z < mu0 - half };
	});
	return { lambda, L, centre: mu0, sigma, steadyUcl: mu0 + steady, steadyLcl: mu0 - steady, points };
}

// ---------------------------------------------------------------------------------------------
// p-chart with varying n (NIST/SEMATECH e-Handbook §6.3.3.2).

/** p̄ ± 3·√(p̄(1 − p̄)/n), the lower limit no lower than 0 and the upper no higher than 1. */
export function pChartLimits(pBar: number, n: number, L = 3): { lcl: number; ucl: number } {
	const half = L * Math.sqrt((pBar * (1 - pBar)) / n);
	return { lcl: Math.max(0, pBar - half), ucl: Math.min(1, pBar + half) };
}

export interface PChartPoint {
	n: number;
	failures: number;
	p: number;
	lcl: number;
	ucl: number;
	beyond: boolean;
}

/** A p-chart of groups (months), p̄ = Σ failures / Σ n over all of them; groups with n = 0 are left out. */
export function pChart(groups: readonly { n: number; failures: number }[], L = 3): { pBar: number | null; n: number; failures: number; points: PChartPoint[] } {
	const kept = groups.filter((g) => g.n > 0);
	const n = kept.reduce((s, g) => s + g.n, 0);
	const failures = kept.reduce((s, g) => s + g.failures, 0);
	if (n === 0) return { pBar: null, n, failures, points: [] };
	const pBar = failures / n;
	return {
		pBar,
		n,
		failures,
		points: kept.map((g) => {
			const { lcl, ucl } = pChartLimits(pBar, g.n, L);
			const p = g.failures / g.n;
			return { n: g.n, failures: g.failures, p, lcl, ucl, beyond: p > ucl || p < lcl };
		})
	};
}
