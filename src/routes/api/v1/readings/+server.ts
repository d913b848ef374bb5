import { json } from '@sveltejs/kit';
import { readingsQuerySchema } from '$lib/schemas/readings';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { readingsExport, readingsPageFor } from '$lib/server/services/readings';
import type { RequestHandler } from './$types';

/**
 * The readings the statistics filters select: with `page`, one page of JSON for a table; without,
 * every row as CSV or a JSON array, streamed from a database cursor as fast as the client reads.
 */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'engineer');
	const q = parseQuery(readingsQuerySchema, event.url);
	if (q.page !== undefined) return json(await orError(() => readingsPageFor(actor.shopId, q)));
	const { body, format, fileName } = await orError(() => readingsExport(actor.shopId, q));
	return new Response(body, {
		headers: {
			'content-type': format === 'csv' ? 'text/csv; charset=utf-8' : 'application/json; charset=utf-8',
			'content-disposition': `attachment; filename="${fileName}"`,
			'cache-control': 'no-store'
		}
	});
};
