// The answers of the statistics routes (/api/v1/stats/*, /api/v1/check). Every number that is
// undefined for the data (an SD of one reading, a rate of zero positions) is null, never NaN.
import { z } from 'zod';
import { DECISION_KINDS } from '../measurements';
import { RULE_IDS } from '../domain/control-rules';
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
		method: z.literal('miettinen_nurminen').meta({
			description:
				"Miettinen & Nurminen's (1985) score test of intake share − exhaust share = 0, and the 95 % interval obtained by inverting the same test (every difference it does not reject at 5 %): the interval excludes 0 exactly when p < 0.05."
		}),
		difference: maybe.meta({ description: 'intake share − exhaust share, as a fraction (× 100 for percentage points).' }),
		ci95: Interval.meta({ description: 'Miettinen–Nurminen 95 % interval of the difference, as fractions.' }),
		statistic: maybe.meta({ description: 'The score statistic z at a difference of 0.' }),
		p: z.number().gt(0).max(1).nullable().meta({ description: 'Two-sided p of no difference; never 0. When `pBelow`, the computed p is smaller and this is the bound 1e-15.' }),
		pBelow: z.boolean().meta({ description: 'true: read "p < 1e-15".' }),
		verdict: z
			.enum(['intake_higher', 'exhaust_higher', 'not_clearly_different'])
			.meta({ description: 'From the interval: above 0, below 0, or containing 0.' })
	})
);
export type SideDifference = z.output<typeof SideDifference>;

const BySide = z.strictObject({ intake: RateCell, exhaust: RateCell });

export const RatesResponse = named(
	'RatesResponse',
	z.strictObject({
		check: z.discriminatedUnion('kind', [
			z.strictObject({
				kind: z.literal('measurement'),
				measurement,
				stage,
				stageDefaulted: z.boolean().meta({ description: 'true when the request named no stage: `stage` is then the default for the measurement (final for roughness and the seal tests, else as received).' })
			}),
			z.strictObject({ kind: z.literal('decision'), decision: z.enum(DECISION_KINDS) })
		]),
		unit: z.literal('valve position').meta({ description: 'What n counts; `failures` counts the positions the check names: outside the limits of their day (a measurement), or given that decision (a decision).' }),
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

export const YieldCell = named(
	'YieldCell',
	z.strictObject({
		heads: count.meta({ description: 'Heads with a final check.' }),
		passed: count.meta({ description: 'Of them, heads whose final check passed without a second round.' }),
		rate: maybe.meta({ description: 'passed / heads; null when heads = 0.' }),
		ci95: Interval.meta({ description: '95 % Wilson score interval.' })
	})
);
export type YieldCell = z.output<typeof YieldCell>;

const MachinistYield = z.strictObject({ machinist: z.string().meta({ description: 'Who took the head’s first final reading.' }), ...YieldCell.shape });

export const FirstPassResponse = named(
	'FirstPassResponse',
	z.strictObject({
		filters: EchoFilters,
		unit: z.literal('head').meta({
			description:
				'A head passes first time when every first final reading of each position × measurement is within the limits of its day (none set: passes) and none was read again later (a retest is a second round). A value corrected in the entry grid replaces the one before and is not a second round.'
		}),
		overall: YieldCell,
		families: z.array(z.strictObject({ family: FamilyLabel, ...YieldCell.shape, byMachinist: z.array(MachinistYield) })),
		byMachinist: z.array(MachinistYield).meta({ description: 'Every family together, per machinist.' })
	})
);
export type FirstPassResponse = z.output<typeof FirstPassResponse>;

const IndexInterval = named(
	'IndexInterval',
	z.strictObject({ lower: z.number(), upper: z.number() }).meta({ description: 'Bissell’s (1990) approximate 95 % interval: index ± 1.96·√(1/(9n) + index²/(2(n − 1))).' })
);

/** Capability of one series of final readings: the indices, what happened, and the verdict. */
const capabilityStats = {
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
	cpkInterval: IndexInterval.nullable(),
	ppkInterval: IndexInterval.nullable(),
	observed: z
		.strictObject({ below: count, above: count, count, share: maybe })
		.meta({ description: 'Readings strictly outside the limits and their share of all readings (what happened).' }),
	observedIndex: maybe.meta({ description: 'The index the observed share implies on its worse side, −Φ⁻¹(share)/3 (0.135 % ↔ 1.00, 31.7 ppm ↔ 1.33); null when no reading is outside.' }),
	predicted: z
		.strictObject({ below: maybe, above: maybe, share: maybe })
		.meta({ description: 'The share outside the limits a normal with the mean and the overall SD predicts.' }),
	normality: z
		.strictObject({
			method: z.literal('anderson_darling'),
			n: count,
			a2: maybe.meta({ description: 'A² with the sample mean and SD; null below 8 readings or without spread.' }),
			a2Adjusted: maybe.meta({ description: 'A²* = A²(1 + 0.75/n + 2.25/n²) (D’Agostino & Stephens 1986).' }),
			pValue: maybe.meta({ description: 'From A²* (D’Agostino & Stephens 1986, Table 4.9); never 0.' }),
			pBelow: z.boolean().meta({ description: 'True when pValue is an upper bound (A²* beyond the approximation’s range).' }),
			rejected: z.boolean().nullable().meta({ description: 'pValue < 0.05.' })
		}),
	nearBound: z
		.strictObject({ side: z.enum(['min', 'max']), value: z.number(), sds: z.number() })
		.nullable()
		.meta({ description: 'A physical bound of the quantity within 3 overall SDs of the mean (the normal fit spills more than 0.135 % past it).' }),
	percentile: z
		.strictObject({ p00135: z.number(), p50: z.number(), p99865: z.number(), cp: maybe, cpu: maybe, cpl: maybe, cpk: maybe })
		.nullable()
		.meta({ description: 'ISO 22514-2 percentile indices from the sample’s 0.135 %, 50 % and 99.865 % quantiles (type 7).' }),
	method: z.enum(['normal', 'percentile']).meta({ description: 'The estimate the verdict used: percentile when the readings fail the normality test or sit near a physical bound (and number at least 100).' }),
	methodReason: z.string(),
	modelIndex: maybe.meta({ description: 'The model’s index the verdict weighed: min(Cpk, Ppk) for the normal method, the percentile Cpk otherwise.' }),
	modelIndexName: z.enum(['Cpk', 'Ppk', 'percentile Cpk']).nullable(),
	modelInterval: IndexInterval.nullable(),
	verdict: z.strictObject({
		level: z.enum(['capable', 'marginal', 'not_capable', 'unknown']),
		text: z.string(),
		basis: z.enum(['model', 'observed']).nullable().meta({ description: 'Whether the model’s index or the observed share outside set the level.' }),
		index: maybe.meta({ description: 'The index the level was read from: the lower of the observed index and the lower end of the model index’s interval.' }),
		sure: z.boolean().meta({ description: 'False when the model index’s 95 % interval reaches into another level (too few readings to be sure).' })
	})
};

const capabilityHead = {
	family: FamilyLabel,
	side,
	stage: z.literal('final'),
	...measured,
	limits: LimitInfo.nullable(),
	limitsAsOf: day
};

export const CapabilityResponse = named(
	'CapabilityResponse',
	z.strictObject({
		...capabilityHead,
		...capabilityStats,
		histogram: z.array(HistogramBin).meta({ description: 'Freedman–Diaconis bins of the readings, 5–60 of them.' }),
		fit: z
			.array(z.strictObject({ x: z.number(), count: z.number() }))
			.meta({ description: 'The fitted normal (mean, overall SD) as readings per bin width, to draw over the histogram.' })
	})
);
export type CapabilityResponse = z.output<typeof CapabilityResponse>;

const ruleId = z.enum(RULE_IDS);

export const CapabilityMachinist = named('CapabilityMachinist', z.strictObject({ machinist: z.string(), ...capabilityStats }));
export type CapabilityMachinist = z.output<typeof CapabilityMachinist>;

export const CapabilityMachinistsResponse = named(
	'CapabilityMachinistsResponse',
	z.strictObject({
		...capabilityHead,
		machinists: z.array(CapabilityMachinist).meta({ description: 'One entry per machinist with final readings in the selection, by name; each judged on their own readings in time order.' })
	})
);
export type CapabilityMachinistsResponse = z.output<typeof CapabilityMachinistsResponse>;

export const ControlPoint = named(
	'ControlPoint',
	z.strictObject({
		id: z.int(),
		t: instant,
		value: z.number(),
		mr: maybe,
		serial: z.string(),
		measuredBy: z.string(),
		beyond: z.boolean(),
		mrBeyond: z.boolean(),
		rules: z.array(ruleId).meta({ description: 'The selected run rules whose pattern this point completes.' })
	})
);
export type ControlPointOut = z.output<typeof ControlPoint>;

export const ControlBaseline = named(
	'ControlBaseline',
	z
		.strictObject({
			source: z.enum(['stored', 'default']).meta({ description: '`stored`: a period chosen with "recompute"; `default`: none chosen, the earliest readings of the series.' }),
			from: day.meta({ description: 'First day (UTC) of the baseline readings.' }),
			to: day.meta({ description: 'Last day (UTC) of the baseline readings.' }),
			n: count,
			centre: z.number(),
			mrBar: z.number(),
			sigma: z.number().meta({ description: 'MR̄ / 1.128, the σ of the zones and of the EWMA.' }),
			setAt: instant.nullable(),
			setBy: z.string().nullable(),
			description: z.string()
		})
		.meta({ description: 'The phase I readings the limits come from; the limits stay fixed whatever window is charted. Null when the series has fewer than two readings.' })
);
export type ControlBaseline = z.output<typeof ControlBaseline>;

export const ControlRuleBreaks = named(
	'ControlRuleBreaks',
	z.strictObject({
		rule: ruleId,
		name: z.string(),
		description: z.string(),
		points: z
			.array(z.strictObject({ index: z.int(), from: z.int(), id: z.int(), t: instant, value: z.number() }))
			.meta({ description: 'Each point completing the pattern (`index` into `points`), with the first point of its pattern (`from`).' })
	})
);

export const EwmaChartOut = named(
	'EwmaChart',
	z.strictObject({
		lambda: z.number(),
		L: z.number(),
		centre: z.number(),
		sigma: z.number(),
		steadyUcl: z.number(),
		steadyLcl: z.number(),
		points: z.array(z.strictObject({ z: z.number(), ucl: z.number(), lcl: z.number(), beyond: z.boolean() })).meta({ description: 'One per point of `points`, in the same order.' })
	})
);

export const ControlResponse = named(
	'ControlResponse',
	z.strictObject({
		family: FamilyLabel,
		side,
		stage,
		...measured,
		total: count.meta({ description: 'Readings in the selection; the chart holds the most recent `n` of them.' }),
		n: count,
		baseline: ControlBaseline.nullable(),
		centre: maybe,
		ucl: maybe.meta({ description: 'x̄ + 2.66·MR̄ of the baseline, no higher than the quantity’s physical upper bound.' }),
		lcl: maybe.meta({ description: 'x̄ − 2.66·MR̄ of the baseline, no lower than the quantity’s physical lower bound.' }),
		uclClipped: z.boolean(),
		lclClipped: z.boolean(),
		rawUcl: maybe.meta({ description: 'The upper limit before clipping.' }),
		rawLcl: maybe.meta({ description: 'The lower limit before clipping.' }),
		bounds: z.strictObject({ min: z.number(), max: maybe }).meta({ description: 'What the quantity can physically be.' }),
		mrBar: maybe,
		mrUcl: maybe,
		mrLcl: maybe,
		specLimits: LimitInfo.nullable().meta({ description: 'The shop’s limits in force, to draw beside the control limits.' }),
		points: z.array(ControlPoint),
		beyondLimits: z.array(z.int()),
		mrBeyondLimits: z.array(z.int()),
		rules: z.array(ruleId).meta({ description: 'The run rules tested.' }),
		ruleBreaks: z.array(ControlRuleBreaks).meta({ description: 'Per rule tested (in rule order), every point that breaks it.' }),
		ewma: EwmaChartOut.nullable().meta({ description: 'EWMA of the same points (λ = 0.2, L = 3), centred on the baseline mean with its σ.' })
	})
);
export type ControlResponse = z.output<typeof ControlResponse>;

export const PChartResponse = named(
	'PChartResponse',
	z.strictObject({
		family: FamilyLabel,
		side: side.nullable(),
		stage,
		measurement,
		filters: EchoFilters,
		pBar: maybe.meta({ description: 'Σ positions outside / Σ positions judged, over the months shown.' }),
		n: count,
		failures: count,
		months: z.array(
			z.strictObject({
				month: z.string().regex(/^\d{4}-\d{2}$/),
				n: count,
				failures: count,
				p: z.number(),
				lcl: z.number(),
				ucl: z.number(),
				beyond: z.boolean()
			})
		)
	})
);
export type PChartResponse = z.output<typeof PChartResponse>;

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
