// Individuals / moving-range (I-MR) control charts (NIST/SEMATECH e-Handbook §6.3.2; constants in
// capability.ts with their sources).

import { momentsOf, momentsToSummary } from './summary';
import { averageMovingRange, D4_MR, E2_MR } from './capability';

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
