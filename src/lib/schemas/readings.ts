// GET /api/v1/readings: the statistics filters, an optional measurement, and either a whole
// export (format=csv|json, streamed) or one page of JSON for a table (page, pageSize, sort).
import { z } from 'zod';
import { MEASUREMENTS } from '../measurements';
import { checkRanges, filterShape, wholeNumber } from './stats';

export const READING_FORMATS = ['csv', 'json'] as const;
export type ReadingFormat = (typeof READING_FORMATS)[number];

/** Sort keys of a page; a leading minus sorts descending. Ties go by reading id. */
export const READING_SORT_KEYS = ['measuredAt', 'serial', 'family', 'customer', 'cylinder', 'measurement', 'value', 'mileage', 'measuredBy'] as const;
export const READING_SORTS = READING_SORT_KEYS.flatMap((k) => [k, `-${k}`] as const);
export type ReadingSort = (typeof READING_SORTS)[number];

/** Rows one page may hold. */
export const READINGS_MAX_PAGE_SIZE = 500;

export const readingsQuerySchema = z
	.strictObject({
		...filterShape,
		measurement: z.enum(MEASUREMENTS, { message: `measurement must be one of: ${MEASUREMENTS.join(', ')}` }).optional(),
		format: z.enum(READING_FORMATS, { message: 'format must be csv or json' }).optional(),
		page: wholeNumber('page', 1_000_000)
			.refine((n) => n >= 1, 'page starts at 1')
			.optional(),
		pageSize: wholeNumber('pageSize', READINGS_MAX_PAGE_SIZE)
			.refine((n) => n >= 1, 'pageSize must be at least 1')
			.optional(),
		sort: z.enum(READING_SORTS as unknown as [ReadingSort, ...ReadingSort[]], { message: `sort must be one of: ${READING_SORTS.join(', ')}` }).optional()
	})
	.superRefine(checkRanges)
	.superRefine((v, ctx) => {
		const paged = v.page !== undefined;
		if (!paged && (v.pageSize !== undefined || v.sort !== undefined)) {
			ctx.addIssue({ code: 'custom', message: 'pageSize and sort apply to one page: add page=1 (an export is in time order)', path: ['page'] });
		}
		if (paged && v.format === 'csv') ctx.addIssue({ code: 'custom', message: 'a page is JSON: leave out format=csv, or leave out page to export every row', path: ['format'] });
	});
export type ReadingsQuery = z.infer<typeof readingsQuerySchema>;
