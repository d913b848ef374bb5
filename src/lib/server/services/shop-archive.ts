// The owner's archive: every table the shop owns, one CSV file each, in one zip, streamed.
// One read-only transaction scoped to the shop (row-level security on top of the explicit
// `shop_id` filter) gives a consistent picture; each table is read through a cursor and written
// into the zip as the client takes it (yazl compresses each entry with zlib off the main
// thread), so a shop of a million readings never sits in the server's memory.
import { once } from 'node:events';
import { PassThrough, type Readable } from 'node:stream';
import type postgres from 'postgres';
import yazl from 'yazl';
import { csvLine } from '../csv';
import { sql as appSql } from '../db';
import { withShopSql } from '../db/scope';

/** Tables with a shop_id that are left out, and why (the README lists them). */
export const ARCHIVE_SKIPPED_TABLES: Record<string, string> = {
	mail_outbox: 'outgoing mail: holds one-time links; the messages themselves reached their readers',
	shop_signups: 'pending sign-ups: password hashes of people who are not members',
	reading_summaries: 'derived from readings (recomputed by the database)',
	reading_value_counts: 'derived from readings (recomputed by the database)',
	reading_value_totals: 'derived from readings (recomputed by the database)',
	reading_position_tallies: 'derived from readings and limits (recomputed by the database)'
};
/** Columns never written: secrets, even hashed. */
export const ARCHIVE_SKIPPED_COLUMNS = new Set(['token_hash', 'password_hash']);

const CURSOR_ROWS = 1000;

interface Column {
	name: string;
	type: string;
}

function quoteIdent(name: string): string {
	return `"${name.replace(/"/g, '""')}"`;
}

/** A select-list entry that postgres.js hands back in a form that reads well in CSV. */
function selectExpr(c: Column): string {
	const id = quoteIdent(c.name);
	// Dates as 2026-01-31 (not a midnight timestamp), JSON and arrays as their JSON text.
	if (c.type === 'date' || c.type === 'json' || c.type === 'jsonb') return `${id}::text as ${id}`;
	if (c.type === 'ARRAY') return `to_json(${id})::text as ${id}`;
	return id;
}

export interface ArchiveEntry {
	file: string;
	table: string;
	rows: number;
}

async function shopTables(t: postgres.TransactionSql): Promise<{ table: string; columns: Column[] }[]> {
	const rows = await t<{ table_name: string; column_name: string; data_type: string }[]>`
		select c.table_name, c.column_name, c.data_type
		from information_schema.columns c
		join information_schema.tables tb on tb.table_schema = c.table_schema and tb.table_name = c.table_name and tb.table_type = 'BASE TABLE'
		where c.table_schema = current_schema()
			and c.table_name in (select table_name from information_schema.columns where table_schema = current_schema() and column_name = 'shop_id')
		order by c.table_name, c.ordinal_position`;
	const byTable = new Map<string, Column[]>();
	for (const r of rows) {
		if (r.table_name in ARCHIVE_SKIPPED_TABLES || ARCHIVE_SKIPPED_COLUMNS.has(r.column_name)) continue;
		if (!byTable.has(r.table_name)) byTable.set(r.table_name, []);
		byTable.get(r.table_name)!.push({ name: r.column_name, type: r.data_type });
	}
	return [...byTable].map(([table, columns]) => ({ table, columns }));
}

/** The queries of the archive, in file order: the shop itself, its members, then every table. */
async function archiveQueries(t: postgres.TransactionSql) {
	const queries: { file: string; table: string; columns: string[]; text: string }[] = [
		{
			file: 'shop.csv',
			table: 'shops',
			columns: ['id', 'name', 'slug', 'length_unit', 'distance_unit', 'currency', 'settings', 'created_at'],
			text: 'select id, name, slug, length_unit, distance_unit, currency, settings::text as settings, created_at from shops where id = $1'
		}
	];
	for (const { table, columns } of await shopTables(t)) {
		if (table === 'memberships') {
			// With the member's name and address (the user table is not the shop's, but these two are).
			queries.push({
				file: 'memberships.csv',
				table,
				columns: ['shop_id', 'user_id', 'email', 'name', 'role', 'created_at'],
				text: 'select m.shop_id, m.user_id, u.email, u.name, m.role, m.created_at from memberships m join "user" u on u.id = m.user_id where m.shop_id = $1 order by m.created_at'
			});
			continue;
		}
		queries.push({
			file: `${table}.csv`,
			table,
			columns: columns.map((c) => c.name),
			text: `select ${columns.map(selectExpr).join(', ')} from ${quoteIdent(table)} where shop_id = $1`
		});
	}
	return queries;
}

function cellsOf(row: Record<string, unknown>, columns: string[]): unknown[] {
	return columns.map((c) => {
		const v = row[c];
		return typeof v === 'boolean' ? (v ? 'true' : 'false') : typeof v === 'bigint' ? v.toString() : v;
	});
}

/**
 * The zip as a Node stream. `onDone` hears the files and their row counts (also written as
 * manifest.csv, the last entry) or the error that cut the archive short.
 */
export function shopArchive(sql: postgres.Sql, shopId: string, onDone?: (entries: ArchiveEntry[] | Error) => void): Readable {
	const zip = new yazl.ZipFile();
	const output = zip.outputStream as Readable;
	const stop = new AbortController();
	let finished = false;
	output.once('end', () => (finished = true));
	// The client went away (or the stream broke): stop reading the database.
	output.once('close', () => {
		if (!finished) stop.abort(new Error('the download was cancelled'));
	});
	const mtime = new Date();

	void withShopSql(
		sql,
		shopId,
		async (t) => {
			const entries: ArchiveEntry[] = [];
			for (const q of await archiveQueries(t)) {
				const entry = new PassThrough();
				zip.addReadStream(entry, q.file, { mtime });
				let rows = 0;
				let chunk = csvLine(q.columns);
				for await (const batch of t.unsafe<Record<string, unknown>[]>(q.text, [shopId]).cursor(CURSOR_ROWS)) {
					for (const r of batch) chunk += csvLine(cellsOf(r, q.columns));
					rows += batch.length;
					if (!entry.write(chunk)) await once(entry, 'drain', { signal: stop.signal });
					chunk = '';
					stop.signal.throwIfAborted();
				}
				entry.end(chunk);
				entries.push({ file: q.file, table: q.table, rows });
			}
			const manifest = csvLine(['file', 'table', 'rows']) + entries.map((e) => csvLine([e.file, e.table, e.rows])).join('');
			zip.addBuffer(Buffer.from(manifest, 'utf8'), 'manifest.csv', { mtime });
			zip.end();
			// Hold the transaction (and its snapshot) until the last entry has been read.
			if (!finished) await once(output, 'end', { signal: stop.signal });
			return entries;
		},
		'read only isolation level repeatable read'
	).then(
			(entries) => onDone?.(entries as ArchiveEntry[]),
			(e: unknown) => {
				const err = e instanceof Error ? e : new Error(String(e));
				if (!stop.signal.aborted) output.destroy(err);
				onDone?.(err);
			}
		);
	return output;
}

/** The shop's archive on the app's database, for the download: a failure that cuts it short is
 * logged (the client sees a broken zip). */
export function archiveDownload(shopId: string): Readable {
	return shopArchive(appSql, shopId, (result) => {
		if (result instanceof Error) console.error(`[archive] shop ${shopId}: ${result.message}`);
	});
}
