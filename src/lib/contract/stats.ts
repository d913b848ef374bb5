// The answers of the statistics routes (/api/v1/stats/*, /api/v1/check). Every number that is
// undefined for the data (an SD of one reading, a rate of zero positions) is null, never NaN.
import { z } from 'zod';
import { DECISION_KINDS } from '../measurements';
import { OUTLIER_SORTS } from '../schemas/stats';
import {
	canonicalUnit,
	count,
	DataSource,
	day,
	EchoFilters,
	FamilyLabel,
	Fences,
	instant,
	Interval,
	LimitInfo,
	maybe,
	measurement,
	named,
	OutlierReason,
	RateCell,
	side,
	stage
} from './common';

/** Hyndman & Fan type 7 (= PostgreSQL percentile_cont). */
export const Quantiles = named('Quantiles', z.strictObject({ p05: maybe, p25: maybe, p50: maybe, p75: maybe, p95: maybe }));
export type Quantiles = z.output<typeof Quantiles>;

export const HistogramBin = named('HistogramBin', z.strictObject({ x0: z.number(), x1: z.number(), count }));
export type HistogramBin = z.output<typeof HistogramBin>;

/** What a distribution and the numbers sent to describe have in common. */
const summaryShape = {
	n: count,
	mean: maybe,
	sd: maybe.meta({ description: 'Sample SD (n − 1); null for fewer than 2 readings.' }),
	min: maybe,
	max: maybe,
	quantiles: Quantiles,
	iqr: maybe,
	mad: maybe.meta({ description: 'Raw MAD, median |x − median|.' }),
	madScaled: maybe.meta({ description: '1.4826 · MAD.' }),
	fences: Fences,
	tukeyOutside: count.meta({ description: 'Readings strictly outside the fences.' }),
	histogram: z.array(HistogramBin).meta({ description: 'Freedman–Diaconis bins, 5–60 of them.' })
};

const ReadingsOutside = z.strictObject({ below: count, above: count, judged: count, share: maybe });

export const DistributionSummary = named(
	'DistributionSummary',
	z.strictObject({
		...summaryShape,
		limits: LimitInfo.nullable().meta({ description: 'The limits in force on `limitsAsOf`, when the selection is one family, side and stage.' }),
		outside: ReadingsOutside.meta({
			description:
				'Readings outside the limit version in force on the day each was measured (the failure question), of their own family × side × stage; `judged` counts the readings measured on a day with limits. These are readings: /stats/rates counts valve positions (a position fails when any of its readings is outside), the same numbers wherever a position has one reading of the selection, as every measurement but a repeated seal test has.'
		}),
		outsideAsOf: ReadingsOutside.meta({
			description: 'The same readings against the limits in force on `limitsAsOf` (today unless `to` is given), the limits the charts draw: a separate question, not a failure share.'
		})
	})
);
export type DistributionSummary = z.output<typeof DistributionSummary>;

const measured = { measurement, unit: canonicalUnit, filters: EchoFilters };

export const DistributionResponse = named(
	'DistributionResponse',
	z.strictObject({ ...measured, limitsAsOf: day, source: DataSource, ...DistributionSummary.shape })
);
export type DistributionResponse = z.output<typeof DistributionResponse>;

export const CompareResponse = named(
	'CompareResponse',
	z.strictObject({
		...measured,
		limitsAsOf: day,
		source: DataSource,
		families: z
			.array(z.strictObject({ family: FamilyLabel, ...DistributionSummary.shape }))
			.meta({ description: 'One entry per family with readings, sorted by median (then code).' })
	})
);
export type CompareResponse = z.output<typeof CompareResponse>;

export const CheckResponse = named(
	'CheckResponse',
	z.strictObject({
		family: FamilyLabel,
		side,
		stage,
		measurement,
		entered: z.strictObject({ value: z.number(), unit: z.string() }).meta({ description: 'The value as entered.' }),
		value: z.number().meta({ description: 'The value in the canonical unit.' }),
		unit: canonicalUnit,
		limits: LimitInfo.nullable(),
		withinLimits: z.boolean().nullable().meta({ description: 'null when no limits are set.' }),
		broken: z.enum(['min', 'max']).nullable(),
		fleet: z.strictObject({ n: count, median: maybe, mad: maybe, fences: Fences }),
		percentile: maybe.meta({ description: 'Share of the fleet below the value, ties counted half (mid-rank), in percent.' }),
		robustZ: maybe.meta({ description: 'Modified z-score 0.6745·(x − median)/MAD (Iglewicz & Hoaglin); null when MAD is 0.' }),
		tukey: z.enum(['low', 'high']).nullable(),
		reasons: z.array(OutlierReason),
		suggestion: z.strictObject({ decision: z.enum(DECISION_KINDS).nullable(), rule: z.string() }),
		caution: z.string()
	})
);
export type CheckResponse = z.output<typeof CheckResponse>;

export const OutlierItem = named(
	'OutlierItem',
	z.strictObject({
		id: z.int(),
		family: FamilyLabel,
		side,
		stage,
		cylinder: z.int(),
		valve: z.int(),
		headId: z.uuid(),
		serial: z.string(),
		value: z.number(),
		measuredAt: instant,
		measuredBy: z.string(),
		limits: LimitInfo.nullable().meta({ description: 'The limit version in effect on the reading’s day.' }),
		modifiedZ: maybe,
		reasons: z.array(OutlierReason)
	})
);
export type OutlierItem = z.output<typeof OutlierItem>;

export const OutliersResponse = named(
	'OutliersResponse',
	z.strictObject({
		...measured,
		source: DataSource,
		page: z.int().min(1),
		pageSize: z.int().min(1),
		sort: z.enum(OUTLIER_SORTS),
		total: count,
		pages: count,
		groups: z
			.array(z.strictObject({ family: FamilyLabel, side, stage, n: count, median: maybe, mad: maybe, fences: Fences }))
			.meta({ description: 'The fences, median and MAD each family × side × stage was judged by.' }),
		items: z.array(OutlierItem)
	})
);
export type OutliersResponse = z.output<typeof OutliersResponse>;

export const SideDifference = named(
	'SideDifference',
	z.strictObject({
		test: z.enum(['fisher', 'chi_square']).meta({ description: "Fisher's exact test when an expected count is below 5, else Pearson's chi-square." }),
		p: maybe,
		statistic: maybe,
		df: maybe,
		minExpected: maybe,
		difference: maybe.meta({ description: "intake rate − exhaust rate, with Newcombe's hybrid score interval." }),
		ci95: Interval
	})
);
export type SideDifference = z.output<typeof SideDifference>;

const BySide = z.strictObject({ intake: RateCell, exhaust: RateCell });

export const RatesResponse = named(
	'RatesResponse',
	z.strictObject({
		check: z.discriminatedUnion('kind', [
			z.strictObject({ kind: z.literal('measurement'), measurement, stage }),
			z.strictObject({ kind: z.literal('decision'), decision: z.enum(DECISION_KINDS) })
		]),
		unit: z.literal('valve position').meta({ description: 'What n counts.' }),
		filters: EchoFilters,
		overall: RateCell,
		bySide: BySide,
		sideDifference: SideDifference.nullable().meta({ description: 'null when either side has no positions.' }),
		families: z.array(z.strictObject({ family: FamilyLabel, ...RateCell.shape, bySide: BySide, sideDifference: SideDifference.nullable() })),
		byCylinder: z
			.array(z.strictObject({ family: FamilyLabel, side, cylinder: z.int(), ...RateCell.shape }))
			.meta({ description: 'For a heat map: family × side × cylinder.' })
	})
);
export type RatesResponse = z.output<typeof RatesResponse>;

export const ComebacksResponse = named(
	'ComebacksResponse',
	z.strictObject({
		filters: EchoFilters,
		unit: z.literal('released head'),
		overall: RateCell,
		families: z.array(z.strictObject({ family: FamilyLabel, ...RateCell.shape }))
	})
);
export type ComebacksResponse = z.output<typeof ComebacksResponse>;

export const CapabilityResponse = named(
	'CapabilityResponse',
	z.strictObject({
		family: FamilyLabel,
		side,
		stage: z.literal('final'),
		...measured,
		limits: LimitInfo.nullable(),
		limitsAsOf: day,
		n: count,
		mean: maybe,
		sdWithin: maybe.meta({ description: 'MR̄/1.128 from consecutive readings in time order.' }),
		sdOverall: maybe,
		cp: maybe,
		cpk: maybe,
		cpu: maybe,
		cpl: maybe,
		pp: maybe,
		ppk: maybe,
		verdict: z.strictObject({ level: z.enum(['capable', 'marginal', 'not_capable', 'unknown']), text: z.string() })
	})
);
export type CapabilityResponse = z.output<typeof CapabilityResponse>;

export const ControlPoint = named(
	'ControlPoint',
	z.strictObject({ id: z.int(), t: instant, value: z.number(), mr: maybe, serial: z.string(), measuredBy: z.string(), beyond: z.boolean(), mrBeyond: z.boolean() })
);
export type ControlPointOut = z.output<typeof ControlPoint>;

export const ControlResponse = named(
	'ControlResponse',
	z.strictObject({
		family: FamilyLabel,
		side,
		stage,
		...measured,
		total: count.meta({ description: 'Readings in the selection; the chart holds the most recent `n` of them.' }),
		n: count,
		centre: maybe,
		ucl: maybe,
		lcl: maybe,
		mrBar: maybe,
		mrUcl: maybe,
		mrLcl: maybe,
		specLimits: LimitInfo.nullable().meta({ description: 'The shop’s limits in force, to draw beside the control limits.' }),
		points: z.array(ControlPoint),
		beyondLimits: z.array(z.int()),
		mrBeyondLimits: z.array(z.int())
	})
);
export type ControlResponse = z.output<typeof ControlResponse>;

export const WearResponse = named(
	'WearResponse',
	z.strictObject({
		measurement,
		stage,
		unit: canonicalUnit,
		filters: EchoFilters,
		n: count,
		slopePer10000Km: maybe.meta({ description: 'Change of the measurement per 10,000 km.' }),
		intercept: maybe,
		r2: maybe,
		residualSd: maybe,
		slopeSePer10000Km: maybe,
		band: z
			.array(z.strictObject({ x: z.number(), fit: z.number(), low: z.number(), high: z.number() }))
			.meta({ description: '95 % confidence band of the mean, at 41 mileages from the lowest to the highest.' }),
		points: z
			.array(z.strictObject({ mileageKm: z.number(), value: z.number() }))
			.meta({ description: 'At most 5,000 points, sampled evenly in reading order when there are more.' }),
		sampled: z.boolean()
	})
);
export type WearResponse = z.output<typeof WearResponse>;

export const DescribeResponse = named(
	'DescribeResponse',
	z.strictObject({ ...summaryShape, lag1Autocorrelation: maybe.meta({ description: 'NIST StRD lag-1 autocorrelation, in the order sent.' }) })
);
export type DescribeResponse = z.output<typeof DescribeResponse>;
