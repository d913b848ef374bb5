// GET /api/v1/readings: one page of readings for a table, or every row (JSON array or CSV).
import { z } from 'zod';
import { READING_SORTS, type ReadingSort } from '../schemas/readings';
import { canonicalUnit, count, EchoFilters, instant, measurement, named, side, stage } from './common';

export const ReadingItem = named(
	'Reading',
	z.strictObject({
		id: z.int(),
		headId: z.uuid(),
		headSerial: z.string(),
		family: z.string(),
		customer: z.string(),
		stage,
		cylinder: z.int(),
		side,
		valve: z.int(),
		measurement,
		value: z.number().meta({ description: 'In `unit`, the measurement’s canonical unit.' }),
		unit: canonicalUnit,
		measuredAt: instant,
		measuredBy: z.string(),
		instrument: z.string().nullable().meta({ description: 'Serial number of the gauge.' }),
		mileageKm: z.int().nullable(),
		batch: z.uuid().nullable().meta({ description: 'Import batch id, for imported readings.' })
	})
);
export type ReadingItem = z.output<typeof ReadingItem>;

export const ReadingsPage = named(
	'ReadingsPage',
	z.strictObject({
		filters: z.strictObject({ ...EchoFilters.shape, measurement: measurement.optional() }),
		page: z.int().min(1),
		pageSize: z.int().min(1),
		sort: z.enum(READING_SORTS as unknown as [ReadingSort, ...ReadingSort[]]),
		total: count.meta({ description: 'Readings the filters select, in all pages.' }),
		pages: count,
		items: z.array(ReadingItem)
	})
);
export type ReadingsPage = z.output<typeof ReadingsPage>;

/** Without `page`: every reading the filters select, in time order. */
export const ReadingsExport = named('ReadingsExport', z.array(ReadingItem));

/** Readings per measurement and stage, in the order of the measurement list (the explore page). */
export const ReadingCount = z.strictObject({ measurement, stage, n: count });
export type ReadingCount = z.output<typeof ReadingCount>;
