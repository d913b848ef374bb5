// The import service for routes: the app's database, the shop's default for rejected rows.
import { Readable } from 'node:stream';
import { db, sql } from '../db';
import { withShop } from '../db/scope';
import { shopOnReject, type OnReject } from '../queries/imports';
import { env, uploadLimitBytes } from '../env';
import { runImport, type ImportOptions } from './run';

export { ImportInputError } from './text';
export { reapDeadImports } from './run';
export type { ImportOutcome, ImportResult } from './run';

export const CSV_TYPES = ['text/csv', 'text/plain', 'application/csv', 'text/tab-separated-values', 'application/vnd.ms-excel'];

/** Imports a CSV; rejected rows are handled as the request says or, when it does not, as the
 * shop's setting says (shopOnReject). The outcome says which applied and where it came from. */
export async function importCsv(body: ReadableStream<Uint8Array>, opts: Omit<ImportOptions, 'limitBytes' | 'onReject'> & { onReject?: OnReject }) {
	const onReject = opts.onReject ?? (await withShop(db, opts.shopId, (tx) => shopOnReject(tx, opts.shopId)));
	const outcome = await runImport(sql, Readable.fromWeb(body as never), { ...opts, onReject, limitBytes: uploadLimitBytes });
	return Object.assign(outcome, { onReject, onRejectFrom: opts.onReject ? ('request' as const) : ('shop setting' as const) });
}
