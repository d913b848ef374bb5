// The import service for routes: the app's database, the shop's default for rejected rows.
import { Readable } from 'node:stream';
import { sql } from '../db';
import { uploadLimitBytes } from '../env';
import { runImport, type ImportOptions } from './run';

export { ImportInputError } from './text';
export { reapDeadImports } from './run';
export type { ImportOutcome, ImportResult } from './run';

export const CSV_TYPES = ['text/csv', 'text/plain', 'application/csv', 'text/tab-separated-values', 'application/vnd.ms-excel'];

export async function importCsv(body: ReadableStream<Uint8Array>, opts: Omit<ImportOptions, 'limitBytes' | 'onReject'> & { onReject?: 'abort' | 'skip' }) {
	const [shop] = await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${opts.shopId}, true)`;
		return t<{ onReject: string | null }[]>`select settings->>'onReject' as "onReject" from shops where id = ${opts.shopId}`;
	});
	const onReject = opts.onReject ?? (shop?.onReject === 'skip' ? 'skip' : 'abort');
	return runImport(sql, Readable.fromWeb(body as never), { ...opts, onReject, limitBytes: uploadLimitBytes });
}
