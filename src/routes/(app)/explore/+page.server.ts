import { z } from 'zod';
import { readFilters } from '$lib/filters';
import { READING_SORTS, type ReadingSort } from '$lib/schemas/readings';
import { familiesFor } from '$lib/server/services/analysis';
import { exploreReadings } from '$lib/server/services/explore';
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
	return { families, filters, ...(await exploreReadings(shopId, q)) };
};
