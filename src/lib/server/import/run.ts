// The bulk import: stream → parse (papaparse) → check each row → COPY → set-based checks →
// inserts, all in one transaction. A batch is committed whole or not at all; a crash, a kill or a
// database restart leaves nothing of it.
//
// Two ways into readings. Direct: the readings of heads the file creates go by COPY straight into
// readings, as the role lapmark_import (drizzle/0006), while the file is still being parsed; only
// rows that need a check across rows (rows of heads already stored, possible duplicates within the
// file) and rejected rows go through the staging table. Staged: every row goes into the staging
// table and one INSERT … SELECT moves the good ones, when that role is missing (an outside server
// set up without it) or for a dry run. Where the role may also set session_replication_role, the
// direct COPY runs in replica mode (copy-channel.ts) and verifyKeys checks the batch's keys.
//
// The parts: batch.ts (the batch's life outside the transaction), csv-stream.ts (papaparse),
// write-rows.ts (each row checked and COPYed: copy-channel.ts, key-sieve.ts, tally.ts), finish.ts
// (after the last row); their SQL is in queries/import-*.ts. Routes reach all this through
// services/imports.ts.
import type { Readable } from 'node:stream';
import type postgres from 'postgres';
import { withShopSql, type ScopedSql } from '../db/scope';
import { committedBatchWithHash } from '../queries/import-batches';
import { createStage, deferHeadCheck, directAvailable, knownSerials, loadRowContext } from '../queries/import-setup';
import { rememberedMapping, rememberMapping } from '../queries/import-mappings';
import { createBatch, lockBatch, markFailed, startHeartbeat, touchBatch } from './batch';
import { csvBatches, feedFrom, guessDelimiter, readStart } from './csv-stream';
import { DryRunOutcome, finish } from './finish';
import { planHeader, type HeaderPlan, type Layout } from './header';
import { ImportInputError, textChunks } from './text';
import { newResult, timer, type ImportOptions, type ImportOutcome } from './types';
import { writeRows } from './write-rows';

// What tests and the jobs reach here by these names.
export type { ImportOptions, ImportOutcome, ImportPath, ImportResult, OnReject, RejectSample, Timings } from './types';
export { CopyChannel, IMPORT_ROLE } from './copy-channel';
export { directAvailable } from '../queries/import-setup';
export { verifyKeys } from '../queries/import-finish';
export { HEARTBEAT_SECONDS, STALE_SECONDS, reapDeadImports } from './batch';

class DuplicateFile extends Error {
	constructor(public batchId: string) {
		super('duplicate file');
	}
}

function isAbort(e: unknown): boolean {
	const err = e as { code?: string; name?: string; message?: string };
	return err?.code === 'ECONNRESET' || err?.name === 'AbortError' || /aborted|terminated|premature close/i.test(err?.message ?? '');
}

/** The header row planned with the request's mapping, or the one remembered for these headers;
 * a mapping the request gives is remembered. */
async function readHeader(t: ScopedSql, opts: ImportOptions, headers: string[]): Promise<HeaderPlan> {
	const mapping = opts.mapping ?? (await rememberedMapping(t, opts.shopId, headers));
	const header = planHeader(headers, opts.layout, mapping ?? {});
	if (!header.ok) {
		throw new ImportInputError(422, header.errors.join(' '), { headers: header.headers, unmatched: header.unmatched, layout: header.layout });
	}
	if (opts.mapping && Object.keys(opts.mapping).length) await rememberMapping(t, opts.shopId, headers, header.plan.layout, opts.mapping);
	return header.plan;
}

export async function runImport(sql: postgres.Sql, body: AsyncIterable<Uint8Array> | Readable, opts: ImportOptions): Promise<ImportOutcome> {
	const t0 = performance.now();
	const now = opts.now ?? new Date();
	const source = textChunks(body, opts.limitBytes);
	const tm = timer();
	let layout: Layout = opts.layout ?? 'wide';
	const batchId = opts.dryRun ? null : await createBatch(sql, opts, layout);
	const heartbeat = batchId ? startHeartbeat(sql, opts.shopId, batchId) : null;

	try {
		const outcome = await withShopSql(sql, opts.shopId, async (t) => {
			if (batchId) await lockBatch(t, batchId);
			const start = await readStart(source.chunks);
			if (start.trim() === '') throw new ImportInputError(422, 'The file is empty.');
			const delimiter = guessDelimiter(start);
			const ctx = await loadRowContext(t, opts.shopId, delimiter === ';', now);
			await createStage(t);
			const nextBatch = csvBatches(feedFrom(start, source.chunks), delimiter);

			// The header first: planning it may query the database, which cannot happen while the
			// connection is in COPY mode.
			const first = await nextBatch();
			if (!first) throw new ImportInputError(422, 'The file is empty.');
			const plan = await readHeader(t, opts, first[0]);
			layout = plan.layout;

			// Every query before the first COPY: the connection takes none while it is in COPY mode.
			const known = await knownSerials(t, opts.shopId);
			const way = !opts.dryRun && batchId !== null && opts.direct !== false ? await directAvailable(t) : { direct: false, replica: false };
			const direct = way.direct;
			const replica = way.replica && opts.replica !== false;
			if (direct) await deferHeadCheck(t);
			const { tally, lines } = await writeRows(t, {
				shopId: opts.shopId,
				batchId,
				onReject: opts.onReject,
				plan,
				ctx,
				known,
				delimiter,
				direct,
				replica,
				first,
				nextBatch,
				progress: (rows) => touchBatch(sql, opts.shopId, batchId!, rows)
			});
			tm.mark('stream_parse_check_copy');
			const hash = source.hash();
			if (batchId) {
				const dup = await committedBatchWithHash(t, opts.shopId, hash);
				if (dup) throw new DuplicateFile(dup);
			}
			return finish(t, opts, { batchId, hash, layout: plan.layout, bytes: source.bytes(), delimiter, t0, tm, tally, lines, path: direct ? (replica ? 'direct-replica' : 'direct') : 'staged' });
		});
		if (outcome.status === 201) {
			// The commit runs the checks that waited for it (the new heads of readings COPYed in).
			tm.mark('commit');
			outcome.result.seconds = (performance.now() - t0) / 1000;
		}
		return outcome;
	} catch (e) {
		if (e instanceof DryRunOutcome) return e.outcome;
		if (e instanceof DuplicateFile) {
			await markFailed(sql, opts.shopId, batchId, 'This file was imported before; nothing was imported again.');
			const r = newResult({ batchId, dryRun: opts.dryRun, layout, bytes: source.bytes(), seconds: (performance.now() - t0) / 1000 });
			r.duplicateOf = e.batchId;
			return { status: 409, result: r, message: `This file was already imported (batch ${e.batchId}).` };
		}
		const message =
			e instanceof ImportInputError
				? e.message
				: isAbort(e)
					? 'The upload was interrupted before the end of the file; nothing was imported.'
					: `The import failed: ${e instanceof Error ? e.message : String(e)}. Nothing was imported.`;
		await markFailed(sql, opts.shopId, batchId, message).catch(() => {});
		throw e instanceof ImportInputError ? e : isAbort(e) ? new ImportInputError(400, message) : e;
	} finally {
		if (heartbeat) clearInterval(heartbeat);
	}
}
