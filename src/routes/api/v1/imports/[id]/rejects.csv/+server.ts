import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guards';
import { csvLine } from '$lib/server/csv';
import { db, sql } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { streamFromShop } from '$lib/server/db/stream';
import { getBatch } from '$lib/server/queries/imports';
import type { RequestHandler } from './$types';

/** Every rejected row of a batch: line number, reason and the row as it was read. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	const batch = await withShop(db, actor.shopId, (tx) => getBatch(tx, actor.shopId, id.data));
	if (!batch) error(404, 'No such import.');
	const body = streamFromShop(sql, actor.shopId, async function* (t) {
		yield csvLine(['line', 'reason', 'row']);
		const cursor = t<{ line: number; reason: string; raw: string }[]>`
			select line, reason, raw from import_rejects where batch_id = ${id.data} order by line`.cursor(2000);
		for await (const rows of cursor) yield rows.map((r) => csvLine([r.line, r.reason, r.raw])).join('');
	});
	const name = batch.fileName.replace(/\.csv$/i, '').replace(/[^\w.-]+/g, '_');
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${name}-rejected-rows.csv"`
		}
	});
};
