// Query strings and bodies of the statistics API (/api/v1/stats/*, /api/v1/check). Shared by
// client and server: the charts build their URLs from the same names.
import { z } from 'zod';
import { calendarDay, text } from './text';
import { parseRules, RULE_IDS, WESTERN_ELECTRIC, type RuleId } from '../domain/control-rules';
import { DECISION_KINDS, MEASUREMENTS, SIDES, STAGES, isUnit, type DecisionKind, type Measurement, type Stage, type Unit } from '../measurements';

/** Decision kinds, the same list as the database's decision_kind enum. */
export const DECISION_KIND_NAMES = DECISION_KINDS;
export type DecisionKindName = DecisionKind;

/** Most values one POST /api/v1/stats/describe accepts. */
export const DESCRIBE_MAX_VALUES = 100_000;
/** Points a wear chart gets at most; more readings are sampled deterministically. */
export const WEAR_MAX_POINTS = 5000;

const list = (xs: readonly string[]) => xs.join(', ');

const familyCode = text('family')
	.trim()
	.regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$/, 'family must be an engine family code, such as ALDER-4');
const measurement = z.enum(MEASUREMENTS, { message: `measurement must be one of: ${list(MEASUREMENTS)}` });
const side = z.enum(SIDES, { message: `side must be one of: ${list(SIDES)}` });
const stage = z.enum(STAGES, { message: `stage must be one of: ${list(STAGES)}` });

const day = (name: string) => calendarDay(name);

export const wholeNumber = (name: string, max: number) =>
	text(name)
		.trim()
		.regex(/^\d+$/, `${name} must be a whole number`)
		.transform(Number)
		.refine((n) => n <= max, `${name} must be at most ${max}`);

/** A decimal number as typed (a point, not a comma), finite. */
const decimal = (name: string) =>
	text(name)
		.trim()
		.regex(/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/, `${name} must be a number, such as 0.065`)
		.transform(Number)
		.refine(Number.isFinite, `${name} is too large`);

/** The filters every statistics route understands, with the names the page URLs use. */
export const filterShape = {
	family: familyCode.optional(),
	side: side.optional(),
	stage: stage.optional(),
	/** First day (UTC) of measured_at, inclusive. */
	from: day('from').optional(),
	/** Last day (UTC) of measured_at, inclusive. */
	to: day('to').optional(),
	/** Who measured (readings.measured_by), case-insensitive. */
	machinist: text('machinist').trim().min(1).max(120, 'machinist is at most 120 characters').optional(),
	/** The head's customer, case-insensitive. */
	customer: text('customer').trim().min(1).max(200, 'customer is at most 200 characters').optional(),
	mileageMin: wholeNumber('mileageMin', 5_000_000).optional(),
	mileageMax: wholeNumber('mileageMax', 5_000_000).optional()
};

type Ranged = { from?: string; to?: string; mileageMin?: number; mileageMax?: number };
export function checkRanges(v: Ranged, ctx: z.RefinementCtx) {
	if (v.from && v.to && v.from > v.to) ctx.addIssue({ code: 'custom', message: 'from must not be after to', path: ['from'] });
	if (v.mileageMin !== undefined && v.mileageMax !== undefined && v.mileageMin > v.mileageMax) {
		ctx.addIssue({ code: 'custom', message: 'mileageMin must not be above mileageMax', path: ['mileageMin'] });
	}
}

export const filtersSchema = z.strictObject(filterShape).superRefine(checkRanges);
export type StatsFilters = z.infer<typeof filtersSchema>;

/** GET /api/v1/stats/distribution */
export const distributionQuerySchema = z.strictObject({ ...filterShape, measurement }).superRefine(checkRanges);
export type DistributionQuery = z.infer<typeof distributionQuerySchema>;

/** GET /api/v1/stats/compare: every family side by side. */
const { family: _family, ...withoutFamily } = filterShape;
export const compareQuerySchema = z.strictObject({ ...withoutFamily, measurement }).superRefine(checkRanges);
export type CompareQuery = z.infer<typeof compareQuerySchema>;

/** GET /api/v1/check: one reading against its family's limits and fleet. */
export const checkQuerySchema = z
	.strictObject({
		family: familyCode,
		side,
		stage: stage.default('as_received'),
		measurement,
		value: decimal('value'),
		unit: text('unit')
			.trim()
			.refine(isUnit, 'unit must be one of: mm, in, um, uin, pct, s')
			.transform((u) => u as Unit)
			.optional()
	})
	.superRefine((v, ctx) => {
		if (v.value < 0) ctx.addIssue({ code: 'custom', message: 'value must not be negative', path: ['value'] });
	});
export type CheckQuery = z.infer<typeof checkQuerySchema>;

export const OUTLIER_SORTS = ['measuredAt', '-measuredAt', 'value', '-value', 'z', '-z'] as const;
export type OutlierSort = (typeof OUTLIER_SORTS)[number];

/** GET /api/v1/stats/outliers */
export const outliersQuerySchema = z
	.strictObject({
		...filterShape,
		measurement,
		page: wholeNumber('page', 1_000_000).refine((n) => n >= 1, 'page starts at 1').default(1),
		pageSize: wholeNumber('pageSize', 500).refine((n) => n >= 1, 'pageSize must be at least 1').default(50),
		/** `z` sorts by |modified z|; a leading minus sorts descending. */
		sort: z.enum(OUTLIER_SORTS, { message: `sort must be one of: ${list(OUTLIER_SORTS)}` }).default('-measuredAt')
	})
	.superRefine(checkRanges);
export type OutliersQuery = z.infer<typeof outliersQuerySchema>;

/** What a failure is: a measurement outside its limits, or a decision of one kind. */
export type RateCheck = { kind: 'measurement'; measurement: Measurement } | { kind: 'decision'; decision: DecisionKindName };

const rateCheck = text('check').trim().transform((s, ctx): RateCheck => {
	if ((MEASUREMENTS as readonly string[]).includes(s)) return { kind: 'measurement', measurement: s as Measurement };
	const m = /^decision:(\w+)$/.exec(s);
	if (m && (DECISION_KIND_NAMES as readonly string[]).includes(m[1])) return { kind: 'decision', decision: m[1] as DecisionKindName };
	ctx.addIssue({
		code: 'custom',
		message: `check must be a measurement (${list(MEASUREMENTS)}) or decision:<kind> (${list(DECISION_KIND_NAMES)})`
	});
	return z.NEVER;
});

/** Measurements taken only at the final check: their rates default to that stage. */
const FINAL_ONLY: readonly Measurement[] = ['roughness_ra', 'vacuum_hold', 'fluid_hold'];

/**
 * The stage a measurement's rate is judged at when a request names none: final for the
 * measurements only the final check takes, as received for the rest. The answer says when it
 * was used (`check.stageDefaulted`), and the rates page always names the stage it asks for.
 */
export const defaultRateStage = (m: Measurement): Stage => (FINAL_ONLY.includes(m) ? 'final' : 'as_received');

/** GET /api/v1/stats/rates */
export const ratesQuerySchema = z
	.strictObject({ ...filterShape, check: rateCheck })
	.superRefine(checkRanges)
	.superRefine((v, ctx) => {
		if (v.check.kind === 'decision') {
			if (v.stage) ctx.addIssue({ code: 'custom', message: 'stage does not apply to a decision check', path: ['stage'] });
			if (v.machinist) {
				ctx.addIssue({ code: 'custom', message: 'machinist does not apply to a decision check (decisions are not measurements)', path: ['machinist'] });
			}
		}
	});
export type RatesQuery = z.infer<typeof ratesQuerySchema>;

/** GET /api/v1/stats/comebacks: released heads and how many came back. */
export const comebacksQuerySchema = z
	.strictObject({
		family: filterShape.family,
		/** Released on or after (UTC day). */
		from: filterShape.from,
		to: filterShape.to,
		customer: filterShape.customer,
		mileageMin: filterShape.mileageMin,
		mileageMax: filterShape.mileageMax
	})
	.superRefine(checkRanges);
export type ComebacksQuery = z.infer<typeof comebacksQuerySchema>;

/** GET /api/v1/stats/first-pass: heads whose final check passed without a second round. */
export const firstPassQuerySchema = z
	.strictObject({
		family: filterShape.family,
		/** The head's first final reading on or after (UTC day). */
		from: filterShape.from,
		to: filterShape.to,
		/** Who took the head's first final reading. */
		machinist: filterShape.machinist,
		customer: filterShape.customer,
		mileageMin: filterShape.mileageMin,
		mileageMax: filterShape.mileageMax
	})
	.superRefine(checkRanges);
export type FirstPassQuery = z.infer<typeof firstPassQuerySchema>;

/** GET /api/v1/stats/capability: the shop's own rework against the final-stage limits. */
export const capabilityQuerySchema = z
	.strictObject({
		...filterShape,
		family: familyCode,
		side,
		measurement,
		stage: z.literal('final', { message: 'capability is judged on final-stage readings: stage must be final' }).default('final')
	})
	.superRefine(checkRanges);
export type CapabilityQuery = z.infer<typeof capabilityQuerySchema>;

/** The `rules` parameter: rule ids (we1–we4, n1–n8) and the sets `we`, `nelson`, `all`. */
const rulesParam = text('rules')
	.trim()
	.transform((s, ctx): RuleId[] => {
		const r = parseRules(s);
		if (r === null) {
			ctx.addIssue({ code: 'custom', message: `rules must be a comma-separated list of: we, nelson, all, none, ${RULE_IDS.join(', ')}` });
			return z.NEVER;
		}
		return r;
	});

/** GET /api/v1/stats/control: individuals and moving-range chart, EWMA, run rules. */
export const controlQuerySchema = z
	.strictObject({
		...filterShape,
		family: familyCode,
		side,
		measurement,
		stage: stage.default('final'),
		/** The most recent readings charted; the limits come from the baseline, not from these. */
		limit: wholeNumber('limit', 10_000).refine((n) => n >= 2, 'limit must be at least 2').default(1000),
		/** The run rules to test; the Western Electric rules unless asked. */
		rules: rulesParam.default(WESTERN_ELECTRIC)
	})
	.superRefine(checkRanges);
export type ControlQuery = z.infer<typeof controlQuerySchema>;

/** GET /api/v1/stats/pchart: monthly share of valve positions outside the limits of their day. */
export const pchartQuerySchema = z
	.strictObject({ ...filterShape, family: familyCode, measurement, stage: stage.default('final') })
	.superRefine(checkRanges);
export type PChartQuery = z.infer<typeof pchartQuerySchema>;

/** The quality page's "recompute the control limits from … to …" form. */
export const baselineFormSchema = z
	.strictObject({ family: familyCode, side, measurement, stage: stage.default('final'), from: day('from'), to: day('to') })
	.superRefine(checkRanges);
export type BaselineForm = z.infer<typeof baselineFormSchema>;

/** GET /api/v1/stats/wear: a measurement against the head's mileage. */
export const wearQuerySchema = z
	.strictObject({ ...filterShape, measurement: measurement.default('clearance'), stage: stage.default('as_received') })
	.superRefine(checkRanges);
export type WearQuery = z.infer<typeof wearQuerySchema>;

/** POST /api/v1/stats/describe: a JSON array of finite numbers. */
export const describeBodySchema = z
	.array(z.number({ message: 'every element must be a finite number' }), {
		message: 'send a JSON array of numbers, such as [0.051, 0.048, 0.062]'
	})
	.max(DESCRIBE_MAX_VALUES, `at most ${DESCRIBE_MAX_VALUES} numbers`);

/** A URL's query string as an object for safeParse: empty parameters mean "not given". */
export function queryObject(params: URLSearchParams): Record<string, string> {
	return Object.fromEntries([...params].filter(([, v]) => v.trim() !== ''));
}

/** One message for a failed parse, naming the parameters. */
export function issuesMessage(issues: readonly z.core.$ZodIssue[]): string {
	return issues
		.map((i) => {
			if (i.code === 'unrecognized_keys') return `unknown parameter${i.keys.length > 1 ? 's' : ''}: ${i.keys.join(', ')}`;
			const name = i.path.join('.');
			if (i.code === 'invalid_type' && name && /received undefined/.test(i.message)) return `${name} is required`;
			return i.message;
		})
		.join('; ');
}
