// GET /api/v1/readings: the query resolved against the shop (family code → id, measurement,
// stage and side → series keys), one page for a table, and the export's file name.
import type { ReadingCount, ReadingsPage } from '../../api/readings';
import type { ReadingsQuery, ReadingSort } from '../../schemas/readings';
import type { Conn } from '../db/scope';
import { readingCounts, readingKeys, readingsPage } from '../queries/readings';
import { seriesOf } from '../db/series';
import type { Selection } from '../queries/stats';
import { resolveFamily, selection } from './stats';

export const DEFAULT_READINGS_PAGE_SIZE = 50;

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
