// GET /api/v1/readings: the query resolved against the shop (family code → id, measurement,
// stage and side → series keys), one page for a table, the whole export streamed from a cursor,
// and the export's file name.
import type { ReadingCount, ReadingsPage } from '../../contract';
import type { ReadingsQuery, ReadingSort } from '../../schemas/readings';
import { csvLine } from '../csv';
import { inShop, sql } from '../db';
import type { Conn } from '../db/scope';
import { seriesOf } from '../db/series';
import { streamFromShop } from '../db/stream';
import { CSV_COLUMNS, exportQuery, readingCounts, readingKeys, readingsPage } from '../queries/readings';
import type { Selection } from '../queries/stats';
import { resolveFamily, selection } from './stats';

export const DEFAULT_READINGS_PAGE_SIZE = 50;

/** Rows fetched from the cursor at a time: the most the server holds of an export. */
const CURSOR_ROWS = 2000;

/** The rows the query selects; 404 when it names a family the shop does not have. */
export async function readingSelection(conn: Conn, shopId: string, q: ReadingsQuery): Promise<Selection> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	return selection(q, readingKeys(q.measurement, q.stage, q.side), family);
}

export async function readingsPageOf(conn: Conn, shopId: string, q: ReadingsQuery, sel: Selection): Promise<ReadingsPage> {
	const page = q.page ?? 1;
	const pageSize = q.pageSize ?? DEFAULT_READINGS_PAGE_SIZE;
	const sort: ReadingSort = q.sort ?? '-measuredAt';
	const { rows, total } = await readingsPage(conn, shopId, sel, { sort, limit: pageSize, offset: (page - 1) * pageSize });
	const { format: _f, page: _p, pageSize: _s, sort: _o, ...filters } = q;
	return { filters, page, pageSize, sort, total, pages: Math.ceil(total / pageSize), items: rows };
}

/** One page of the readings the query selects, in the shop's scope. */
export function readingsPageFor(shopId: string, q: ReadingsQuery): Promise<ReadingsPage> {
	return inShop(shopId, async (tx) => readingsPageOf(tx, shopId, q, await readingSelection(tx, shopId, q)));
}

/**
 * Every reading the query selects, as CSV or a JSON array, streamed from a cursor inside the
 * shop's transaction as fast as the client reads. The selection is resolved first, so a family
 * the shop does not have is a 404 before anything streams.
 */
export async function readingsExport(shopId: string, q: ReadingsQuery): Promise<{ body: ReadableStream<Uint8Array>; format: 'csv' | 'json'; fileName: string }> {
	const sel = await inShop(shopId, (tx) => readingSelection(tx, shopId, q));
	const format = q.format ?? 'json';
	const { text, params } = exportQuery(shopId, sel);
	const body = streamFromShop(sql, shopId, async function* (t) {
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
	return { body, format, fileName: exportFileName(q, format) };
}

/** lapmark-readings[-FAMILY][-measurement]-YYYY-MM-DD.csv|json */
export function exportFileName(q: ReadingsQuery, format: 'csv' | 'json', today = new Date()): string {
	const parts = ['lapmark-readings', q.family, q.measurement, today.toISOString().slice(0, 10)].filter(Boolean);
	return `${parts.join('-').replace(/[^\w.-]+/g, '_')}.${format}`;
}

/** Readings of the selection per measurement and stage (both sides together). */
export async function countsOf(conn: Conn, shopId: string, sel: Selection): Promise<ReadingCount[]> {
	const out = new Map<string, ReadingCount>();
	for (const { key, n } of await readingCounts(conn, shopId, sel)) {
		const { measurement, stage } = seriesOf(key);
		const id = `${measurement}|${stage}`;
		const c = out.get(id) ?? { measurement, stage, n: 0 };
		c.n += n;
		out.set(id, c);
	}
	return [...out.values()];
}
