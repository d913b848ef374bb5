// The pieces every /api/v1 answer is built of, as zod schemas: the one definition of the API's
// response contract. TypeScript types come from them (z.output), the OpenAPI document is
// generated from them (src/lib/server/openapi.ts) and tests/e2e/api-contract.e2e.ts checks real
// answers against that document. Browser-safe: zod and $lib's browser-safe modules only.
import { z } from 'zod';
import { MEASUREMENTS, SIDES, STAGES, type CanonicalUnit } from '../measurements';

/** Schemas with a name in the OpenAPI document's components (`#/components/schemas/<id>`). */
export const contract = z.registry<{ id: string; description?: string }>();

/** Registers `schema` under `id` (a component of the document) and returns it. */
export function named<S extends z.ZodType>(id: string, schema: S, description?: string): S {
	contract.add(schema, description ? { id, description } : { id });
	return schema;
}

/** A number that is undefined for the data (an SD of one reading) is null, never NaN. */
export const maybe = z.number().nullable();
export const count = z.int().min(0);

export const measurement = z.enum(MEASUREMENTS);
export const side = z.enum(SIDES);
export const stage = z.enum(STAGES);
export const canonicalUnit = z.enum(['mm', 'um', 'pct', 's'] satisfies CanonicalUnit[]);
/** 'YYYY-MM-DD' */
export const day = z.iso.date();
/** ISO 8601, UTC. */
export const instant = z.iso.datetime();

export const ErrorBody = named(
	'Error',
	z.strictObject({
		message: z.string(),
		id: z.string().optional().meta({ description: 'Reference of an unexpected error in the server log.' }),
		errors: z.record(z.string(), z.string()).optional()
	})
);
export type ErrorBody = z.output<typeof ErrorBody>;

export const FamilyLabel = named('FamilyLabel', z.strictObject({ id: z.uuid(), code: z.string() }));
export type FamilyLabel = z.output<typeof FamilyLabel>;

/** The filters a response was computed for, as parsed (absent ones omitted). */
export const EchoFilters = named(
	'EchoFilters',
	z.strictObject({
		family: z.string().optional(),
		side: side.optional(),
		stage: stage.optional(),
		from: day.optional(),
		to: day.optional(),
		machinist: z.string().optional(),
		customer: z.string().optional(),
		mileageMin: count.optional(),
		mileageMax: count.optional()
	}),
	'The filters the answer was computed for, as parsed.'
);
export type EchoFilters = z.output<typeof EchoFilters>;

/** Where the numbers came from: the per-month summaries, readings, or both (partial months). */
export const DataSource = z.enum(['summaries', 'summaries+readings', 'readings']);
export type DataSource = z.output<typeof DataSource>;

export const Interval = named('Interval', z.strictObject({ low: maybe, high: maybe }));
/** Tukey's inner fences Q1 − 1.5·IQR, Q3 + 1.5·IQR. */
export const Fences = Interval;

export const LimitInfo = named(
	'LimitInfo',
	z.strictObject({ min: maybe, max: maybe, effectiveFrom: day.meta({ description: 'The day this version took effect.' }) })
);
export type LimitInfo = z.output<typeof LimitInfo>;

export const OutlierReason = named(
	'Reason',
	z.strictObject({ code: z.enum(['below_limit', 'above_limit', 'tukey_low', 'tukey_high', 'modified_z']), text: z.string() })
);
export type OutlierReason = z.output<typeof OutlierReason>;

export const RateCell = named(
	'RateCell',
	z.strictObject({
		failures: count,
		n: count,
		rate: maybe.meta({ description: 'failures / n; null when n = 0.' }),
		ci95: Interval.meta({ description: '95 % Wilson score interval.' })
	})
);
export type RateCell = z.output<typeof RateCell>;
