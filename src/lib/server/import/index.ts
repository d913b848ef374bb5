// The import service for routes: the app's database, the shop's default for rejected rows.
import { Readable } from 'node:stream';
import { db, sql } from '../db';
import { withShop } from '../db/scope';
import { shopOnReject, type OnReject } from '../queries/imports';
import { env, uploadLimitBytes } from '../env';
import { reapDeadImports, runImport, type ImportOptions } from './run';

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

let watch: ReturnType<typeof setInterval> | null = null;

/**
 * Every server looks for imports that died (their server killed, or cut off from the database)
 * every LAPMARK_IMPORT_WATCH_MS (10 s), so a dead import shows as failed within about 40 s
 * without anyone opening a page. Returns a function that stops the watch.
 */
export function startImportWatch(everyMs = env.LAPMARK_IMPORT_WATCH_MS): () => void {
	if (!watch) {
		let busy = false;
		watch = setInterval(() => {
			if (busy) return;
			busy = true;
			reapDeadImports(sql)
				.then((n) => n > 0 && console.error(`[import] marked ${n} import${n === 1 ? '' : 's'} that stopped before finishing as failed`))
				.catch((e) => console.error('[import] the watch for dead imports failed:', e instanceof Error ? e.message : e))
				.finally(() => (busy = false));
		}, everyMs);
		watch.unref();
	}
	return stopImportWatch;
}

export function stopImportWatch() {
	if (watch) clearInterval(watch);
	watch = null;
}
