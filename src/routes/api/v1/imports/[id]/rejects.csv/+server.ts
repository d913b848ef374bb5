import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { rejectedRowsCsv } from '$lib/server/services/imports';
import type { RequestHandler } from './$types';

/** Every rejected row of a batch: line number, reason and the row as it was read. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	const { fileName, body } = await orError(() => rejectedRowsCsv(actor.shopId, id.data));
	const name = fileName.replace(/\.csv$/i, '').replace(/[^\w.-]+/g, '_');
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${name}-rejected-rows.csv"`
		}
	});
};
