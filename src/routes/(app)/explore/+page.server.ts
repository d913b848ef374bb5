import { isHttpError } from '@sveltejs/kit';
import { z } from 'zod';
import { readFilters } from '$lib/filters';
import { READING_SORTS, type ReadingSort } from '$lib/schemas/readings';
import { familiesFor } from '$lib/server/services/analysis';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { countsOf, readingSelection, readingsPageOf } from '$lib/server/services/readings';
import type { PageServerLoad } from './$types';

const PAGE_SIZE = 50;
const paging = z.object({
	page: z.coerce.number().int().min(1).max(1_000_000).catch(1),
	sort: z.enum(READING_SORTS as unknown as [ReadingSort, ...ReadingSort[]]).catch('-measuredAt')
});

// The table is loaded here, from the URL (filters, page, sort), so a view works before any
// JavaScript and can be bookmarked; the downloads take the same filters to /api/v1/readings.
export const load: PageServerLoad = async (event) => {
	const { families } = await familiesFor(event, 'engineer');
	const shopId = event.locals.actor!.shopId!;
	const { filters } = readFilters(event.url.searchParams);
	const { page, sort } = paging.parse({ page: event.url.searchParams.get('page') ?? undefined, sort: event.url.searchParams.get('sort') ?? undefined });
	const q = { ...filters, page, pageSize: PAGE_SIZE, sort };
	try {
		return await withShop(db, shopId, async (tx) => {
			const sel = await readingSelection(tx, shopId, q);
			const [table, counts] = await Promise.all([readingsPageOf(tx, shopId, q, sel), countsOf(tx, shopId, sel)]);
			return { families, filters, table, counts, problem: null };
		});
	} catch (e) {
		// A family that is gone (an old bookmark): say so on the page rather than fail it.
		if (isHttpError(e) && e.status === 404) return { families, filters, table: null, counts: [], problem: e.body.message };
		throw e;
	}
};
