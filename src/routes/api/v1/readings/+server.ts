import { json } from '@sveltejs/kit';
import { readingsQuerySchema } from '$lib/schemas/readings';
import { requireRole } from '$lib/server/auth/guards';
import { csvLine } from '$lib/server/csv';
import { db, sql } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { streamFromShop } from '$lib/server/db/stream';
import { parseQuery } from '$lib/server/http';
import { CSV_COLUMNS, exportQuery } from '$lib/server/queries/readings';
import { exportFileName, readingSelection, readingsPageOf } from '$lib/server/services/readings';
import type { RequestHandler } from './$types';

/** Rows fetched from the cursor at a time: the most the server holds of an export. */
const CURSOR_ROWS = 2000;

/**
 * The readings the statistics filters select: with `page`, one page of JSON for a table; without,
 * every row as CSV or a JSON array, streamed from a database cursor as fast as the client reads.
 */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'engineer');
	const q = parseQuery(readingsQuerySchema, event.url);
	if (q.page !== undefined) {
		return json(await withShop(db, actor.shopId, async (tx) => readingsPageOf(tx, actor.shopId, q, await readingSelection(tx, actor.shopId, q))));
	}
	const sel = await withShop(db, actor.shopId, (tx) => readingSelection(tx, actor.shopId, q));
	const format = q.format ?? 'json';
	const { text, params } = exportQuery(actor.shopId, sel);
	const body = streamFromShop(sql, actor.shopId, async function* (t) {
		const cursor = t.unsafe<Record<string, unknown>[]>(text, params as never[]).cursor(CURSOR_ROWS);
		if (format === 'csv') {
			yield csvLine(CSV_COLUMNS.map(([name]) => name));
			for await (const rows of cursor) yield rows.map((r) => csvLine(CSV_COLUMNS.map(([, key]) => r[key]))).join('');
			return;
		}
		let first = true;
		yield '[';
		for await (const rows of cursor) {
			let out = '';
			for (const r of rows) {
				out += (first ? '\n' : ',\n') + JSON.stringify(r);
				first = false;
			}
			yield out;
		}
		yield first ? ']\n' : '\n]\n';
	});
	return new Response(body, {
		headers: {
			'content-type': format === 'csv' ? 'text/csv; charset=utf-8' : 'application/json; charset=utf-8',
			'content-disposition': `attachment; filename="${exportFileName(q, format)}"`,
			'cache-control': 'no-store'
		}
	});
};
