// The bulk import: stream → parse (papaparse) → check each row → COPY → set-based checks →
// inserts, all in one transaction. A batch is committed whole or not at all; a crash, a kill or a
// database restart leaves nothing of it.
//
// Two ways into readings. Direct: the readings of heads the file creates go by COPY straight into
// readings, as the role lapmark_import (drizzle/0006), while the file is still being parsed; only
// rows that need a check across rows (rows of heads already stored, possible duplicates within the
// file) and rejected rows go through the staging table. Staged: every row goes into the staging
// table and one INSERT … SELECT moves the good ones, when that role is missing (an outside server
// set up without it) or for a dry run.
//
// Where the role may also set session_replication_role (scripts/pg.sh grants it), the direct COPY
// runs in replica mode: no per-row foreign-key checks, which were half of the database's work; the
// summary triggers fire in every mode (drizzle/0007), and verifyKeys checks every reading of the
// batch against its head, batch and instrument in one query before the commit.
import { once } from 'node:events';
import { Readable, type Writable } from 'node:stream';
import Papa from 'papaparse';
import type postgres from 'postgres';
import { v7 as uuidv7 } from 'uuid';
import { planHeader, headerSignature, type HeaderPlan, type Layout } from './header';
import { checkRow, type FamilyLayout, type GoodRow, type RowContext } from './rows';
import { ImportInputError, textChunks } from './text';
import { withShopSql, withSystemSql } from '../db/scope';

export type OnReject = 'abort' | 'skip';
export type ImportPath = 'direct-replica' | 'direct' | 'staged';

export interface ImportOptions {
	shopId: string;
	actor: { userId: string | null; label: string };
	fileName: string;
	layout?: Layout;
	dryRun: boolean;
	onReject: OnReject;
	/** Original header → Lapmark name or `ignore`; when absent, a remembered mapping is used. */
	mapping?: Record<string, string>;
	clientRef?: string;
	limitBytes: number;
	now?: Date;
	/** false: stage every row even when the import role is there (tests compare both ways). */
	direct?: boolean;
	/** false: take the direct way with every row's foreign-key checks (tests compare both ways). */
	replica?: boolean;
}

export interface RejectSample {
	line: number;
	reason: string;
	raw: string;
}

/** Milliseconds spent in each phase, for the benchmark and the batch's record. */
export type Timings = Record<string, number>;

function timer() {
	const timings: Timings = {};
	let last = performance.now();
	return {
		timings,
		mark(label: string) {
			const now = performance.now();
			timings[label] = Math.round((timings[label] ?? 0) + now - last);
			last = now;
		}
	};
}

export interface ImportResult {
	batchId: string | null;
	dryRun: boolean;
	layout: Layout;
	accepted: number;
	rejected: number;
	readings: number;
	duplicates: number;
	createdHeads: number;
	duplicateOf: string | null;
	rejects: RejectSample[];
	bytes: number;
	seconds: number;
	timings?: Timings;
	/** How readings went in: COPY straight into readings (in replica mode, keys checked per batch),
	 * or through the staging table. */
	path?: ImportPath;
}

export type ImportOutcome =
	| { status: 200 | 201; result: ImportResult }
	| { status: 409; result: ImportResult; message: string }
	| { status: 422; result: ImportResult; message: string };

const STAGE_COLUMNS =
	'line, serial, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, mileage, customer, reason, raw, known, dup';

/** One field in COPY text format. */
function esc(v: string | number | null): string {
	if (v === null) return '\\N';
	const s = String(v);
	return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n').replace(/\r/g, '\\r') : s;
}

/** Columns of a reading COPYed straight into readings; shop and batch are the import's own. */
const READING_COLUMNS = 'shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id';

/** The role that may COPY into readings (it bypasses row-level security and may only insert
 * readings; scripts/pg.sh creates it, drizzle/0006 grants it). */
export const IMPORT_ROLE = 'lapmark_import';

/** Whether this connection may take the direct way (the role is there, bypasses row-level
 * security, may insert readings and may be switched to, and the head check can wait for commit),
 * and whether that role may load in replica mode, without per-row foreign-key checks. */
export async function directAvailable(t: postgres.TransactionSql): Promise<{ direct: boolean; replica: boolean }> {
	const [r] = await t<{ direct: boolean; replica: boolean }[]>`
		select coalesce((
			select r.rolbypassrls and pg_has_role(current_user, r.oid, 'MEMBER') and has_table_privilege(r.oid, 'readings', 'INSERT')
			from pg_roles r where r.rolname = ${IMPORT_ROLE}
		), false) and coalesce((
			select condeferrable from pg_constraint where conname = 'readings_head_fk' and conrelid = 'readings'::regclass
		), false) as direct,
		coalesce((
			select has_parameter_privilege(r.oid, 'session_replication_role', 'SET') from pg_roles r where r.rolname = ${IMPORT_ROLE}
		), false) and not exists (
			-- every summary trigger must fire in replica mode (drizzle/0007)
			select 1 from pg_trigger where tgrelid = 'readings'::regclass and tgname like 'readings_stats_%' and tgenabled <> 'A'
		) as replica`;
	return { direct: r.direct, replica: r.direct && r.replica };
}

type CopyTarget = 'readings' | 'stage';

/**
 * The transaction's connection takes one COPY at a time: this keeps one open, into readings (as
 * the import role, for that statement only) or into the staging table, and switches between them.
 */
export class CopyChannel {
	private target: CopyTarget | null = null;
	private writable: Writable | null = null;
	private ended: Promise<never> | null = null;
	/** An error the server raised during a COPY; the stream loop checks it. */
	error: Error | null = null;

	/** `replica`: COPY into readings with session_replication_role = replica (see the top). */
	constructor(
		private t: postgres.TransactionSql,
		private replica = false
	) {}

	async write(target: CopyTarget, text: string): Promise<void> {
		if (this.error) throw this.error;
		if (this.target !== target) {
			await this.end();
			await this.begin(target);
		}
		if (!this.writable!.write(text)) await once(this.writable!, 'drain');
	}

	private async begin(target: CopyTarget) {
		if (target === 'readings') {
			await this.t.unsafe(`set local role ${IMPORT_ROLE}`);
			if (this.replica) await this.t`set local session_replication_role = replica`;
		}
		const query = this.t.unsafe(
			target === 'readings' ? `copy readings (${READING_COLUMNS}) from stdin` : `copy import_stage (${STAGE_COLUMNS}) from stdin`
		) as postgres.PendingQuery<postgres.Row[]> & { reject: (e: Error) => void };
		// postgres.js settles a COPY's promise with its stream when the COPY starts, so an error the
		// server raises when the COPY ends (a check at the end of the statement) reaches no promise
		// and the stream never finishes: the query's reject is wrapped to catch it.
		const settle = query.reject;
		this.ended = new Promise<never>((_, reject) => {
			query.reject = (e: Error) => {
				reject(e);
				settle(e);
			};
		});
		this.ended.catch(() => {});
		query.catch(() => {}); // seen through `ended` and the stream
		const writable = (await query.writable()) as Writable;
		writable.on('error', (e) => (this.error ??= e));
		this.writable = writable;
		this.target = target;
	}

	/** Ends the open COPY, if any, and waits for the server to accept it. */
	async end(): Promise<void> {
		const writable = this.writable;
		if (!writable) return;
		if (this.error) throw this.error;
		const target = this.target;
		this.writable = null;
		this.target = null;
		writable.end();
		await Promise.race([once(writable, 'finish'), this.ended]);
		if (target === 'readings') {
			// Back to checking every row, while still the role that may change the setting.
			if (this.replica) await this.t`set local session_replication_role = origin`;
			await this.t`reset role`;
		}
	}

	/** Ends the open COPY with an error, so that the connection leaves COPY mode and can roll back. */
	abort(e: unknown) {
		this.writable?.destroy(e instanceof Error ? e : new Error(String(e)));
		this.writable = null;
		this.target = null;
	}
}

/** The line of each reading COPYed straight into readings, in the order they went in. */
class DirectLines {
	private lines = new Uint32Array(1024);
	private ends = new Uint32Array(1024); // readings so far, after each row
	private rows = 0;
	readings = 0;
	add(line: number, readings: number) {
		if (this.rows === this.lines.length) {
			const grow = (a: Uint32Array) => {
				const b = new Uint32Array(a.length * 2);
				b.set(a);
				return b;
			};
			this.lines = grow(this.lines);
			this.ends = grow(this.ends);
		}
		this.readings += readings;
		this.lines[this.rows] = line;
		this.ends[this.rows++] = this.readings;
	}
	/** The line of the n-th reading (1-based). */
	lineOf(n: number): number {
		let lo = 0;
		let hi = this.rows - 1;
		while (lo < hi) {
			const mid = (lo + hi) >>> 1;
			if (this.ends[mid] < n) lo = mid + 1;
			else hi = mid;
		}
		return this.lines[lo];
	}
}

/** The lock a running import holds for its whole transaction; a batch marked running whose lock
 * is free belongs to an import that died. */
const LOCK_CLASS = 7_120_426;

class DuplicateFile extends Error {
	constructor(public batchId: string) {
		super('duplicate file');
	}
}


async function loadContext(t: postgres.TransactionSql, shopId: string, decimalComma: boolean, now: Date): Promise<RowContext> {
	const fams = await t<FamilyLayout[]>`
		select id, code, cylinders, intake_valves as "intakeValves", exhaust_valves as "exhaustValves"
		from families where shop_id = ${shopId}`;
	const insts = await t<{ id: string; name: string; serial: string }[]>`select id, name, serial from instruments where shop_id = ${shopId}`;
	const instruments = new Map<string, string>();
	for (const i of insts) {
		instruments.set(i.name.toLowerCase(), i.id);
		instruments.set(i.serial.toLowerCase(), i.id);
	}
	return {
		families: new Map(fams.map((f) => [f.code.toLowerCase(), f])),
		instruments,
		decimalComma,
		latest: now.getTime() + 5 * 60_000
	};
}

const DELIMITERS = [',', ';', '\t', '|'];

/** The delimiter, as papaparse guesses it from the first lines; with a single line, the
 * candidate that splits the header most (papaparse needs two rows to compare). */
function guessDelimiter(start: string): string {
	const lines = start.split(/\r?\n/).slice(0, 10);
	if (lines.length > 2) {
		const guess = Papa.parse(lines.join('\n'), { preview: 10, delimitersToGuess: DELIMITERS });
		if (guess.meta.delimiter && DELIMITERS.includes(guess.meta.delimiter)) return guess.meta.delimiter;
	}
	const header = lines[0];
	const counts = DELIMITERS.map((d) => header.split(d).length);
	const best = Math.max(...counts);
	return best > 1 ? DELIMITERS[counts.indexOf(best)] : ',';
}

/**
 * The rows of the CSV, one chunk of text at a time: papaparse parses each chunk of the upload as
 * it arrives and hands over all its rows at once. Parsing and the upload wait (paused) while the
 * caller works through a batch, so the file is never held in memory. Returns null at the end.
 */
function csvBatches(feed: Readable, delimiter: string): () => Promise<string[][] | null> {
	const batches: string[][][] = [];
	let parser: Papa.Parser | null = null;
	let finished = false;
	let failure: unknown = null;
	let wake: (() => void) | null = null;
	const notify = () => {
		const w = wake;
		wake = null;
		w?.();
	};
	Papa.parse<string[]>(feed, {
		delimiter,
		header: false,
		skipEmptyLines: false, // blank lines count, so line numbers match the file
		chunk(results, p) {
			parser = p;
			p.pause();
			feed.pause();
			if (results.data.length) batches.push(results.data);
			notify();
		},
		complete() {
			finished = true;
			notify();
		},
		error(e) {
			failure = e;
			notify();
		}
	});
	return async () => {
		for (;;) {
			if (failure) throw failure;
			const batch = batches.shift();
			if (batch) return batch;
			if (finished) return null;
			const woken = new Promise<void>((resolve) => (wake = resolve));
			if (parser) {
				const p: Papa.Parser = parser;
				parser = null;
				p.resume();
				feed.resume();
			}
			await woken;
		}
	};
}

/** Enough of the start of the file to see its delimiter: a few lines, or all of a small file. */
async function readStart(chunks: AsyncGenerator<string>): Promise<string> {
	let text = '';
	while (text.length < 65_536 && (text.match(/\n/g)?.length ?? 0) < 5) {
		const next = await chunks.next();
		if (next.done) break;
		text += next.value;
	}
	return text;
}

export async function runImport(sql: postgres.Sql, body: AsyncIterable<Uint8Array> | Readable, opts: ImportOptions): Promise<ImportOutcome> {
	const t0 = performance.now();
	const now = opts.now ?? new Date();
	const source = textChunks(body, opts.limitBytes);
	const tm = timer();
	let batchId: string | null = null;
	let layout: Layout = opts.layout ?? 'wide';
	const result = (): ImportResult => ({
		batchId,
		dryRun: opts.dryRun,
		layout,
		accepted: 0,
		rejected: 0,
		readings: 0,
		duplicates: 0,
		createdHeads: 0,
		duplicateOf: null,
		rejects: [],
		bytes: source.bytes(),
		seconds: (performance.now() - t0) / 1000
	});

	if (!opts.dryRun) {
		const [b] = await withShopSql(sql, opts.shopId, (t) => t<{ id: string }[]>`
			insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status, created_by, client_ref)
			values (${opts.shopId}, ${opts.fileName.slice(0, 255)}, '', ${layout}, ${opts.onReject}, 'running', ${opts.actor.userId}, ${opts.clientRef ?? null})
			returning id`);
		batchId = b.id;
	}
	const heartbeat = batchId ? startHeartbeat(sql, opts.shopId, batchId) : null;

	try {
		const outcome = await withShopSql(sql, opts.shopId, async (t) => {
			if (batchId) await t`select pg_advisory_xact_lock(${LOCK_CLASS}, hashtext(${batchId}))`;
			const start = await readStart(source.chunks);
			if (start.trim() === '') throw new ImportInputError(422, 'The file is empty.');
			const delimiter = guessDelimiter(start);
			const ctx = await loadContext(t, opts.shopId, delimiter === ';', now);

			await t.unsafe(`create temp table import_stage (
				line int not null, serial text, head_id uuid, family_id uuid, stage stage, cylinder smallint, side side, valve smallint,
				measurement measurement, value double precision, measured_at timestamptz, measured_by text,
				instrument_id uuid, mileage integer, customer text, reason text, raw text,
				known boolean not null default false, dup boolean not null default false, bad boolean not null default false
			) on commit drop`);

			const feed = Readable.from(
				(async function* () {
					yield start;
					for await (const c of source.chunks) yield c;
				})(),
				{ objectMode: false, encoding: 'utf8' }
			);
			const nextBatch = csvBatches(feed, delimiter);

			// The header first: planning it may query the database, which cannot happen while the
			// connection is in COPY mode.
			let batch = await nextBatch();
			if (!batch) throw new ImportInputError(422, 'The file is empty.');
			const head = { value: batch[0] };
			const mapping = opts.mapping ?? (await rememberedMapping(t, opts.shopId, head.value));
			const header = planHeader(head.value, opts.layout, mapping ?? {});
			layout = header.ok ? header.plan.layout : header.layout;
			if (!header.ok) {
				throw new ImportInputError(422, header.errors.join(' '), { headers: header.headers, unmatched: header.unmatched, layout: header.layout });
			}
			const plan: HeaderPlan = header.plan;
			if (opts.mapping && Object.keys(opts.mapping).length) await rememberMapping(t, opts.shopId, head.value, plan.layout, opts.mapping);

			// Every query before the first COPY: the connection takes none while it is in COPY mode.
			const known = await knownSerials(t, opts.shopId);
			const way = !opts.dryRun && batchId !== null && opts.direct !== false ? await directAvailable(t) : { direct: false, replica: false };
			const direct = way.direct;
			const replica = way.replica && opts.replica !== false;
			// New heads are inserted after their readings (below, in finish): their check waits.
			if (direct) await t`set constraints readings_head_fk deferred`;
			const familyCodes = new Map([...ctx.families.values()].map((f) => [f.id, f.code]));
			const channel = new CopyChannel(t, replica);
			let staged = '';
			let straight = '';
			const flushStaged = () => channel.write('stage', staged).then(() => void (staged = ''));
			const flushStraight = () => channel.write('readings', straight).then(() => void (straight = ''));

			const seen = new KeySieve();
			const lines = new DirectLines();
			const tally: Tally = { goodRows: 0, badRows: 0, goodReadings: 0, dupCandidates: 0, newHeads: new Map() };
			// When rejected rows abort the file, readings stop going straight in at the first reject:
			// all that went in must be deleted again.
			let straightOn = direct;
			const reject = (line: number, reason: string, cells: string[]) => {
				tally.badRows++;
				if (opts.onReject === 'abort') straightOn = false;
				const raw = Papa.unparse([cells], { delimiter, newline: '' });
				staged += `${line}\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t${esc(reason)}\t${esc(raw.slice(0, 4000))}\tf\tf\n`;
			};
			const dupFlags: boolean[] = [];
			try {
				let line = 1;
				let rows = 0;
				for (let i = 1; batch; batch = await nextBatch(), i = 0) {
					for (; i < batch.length; i++) {
						const cells = batch[i];
						line++; // blank lines are kept by the parser so line numbers match the file
						if (channel.error) throw channel.error;
						if (cells.length === 1 && cells[0].trim() === '') continue;
						rows++;
						const r = checkRow(cells, plan, ctx);
						if (!r.ok) {
							reject(line, r.reason, cells);
						} else {
							const g = r.row;
							const knownHead = known.get(g.serial);
							const newHead = knownHead ? undefined : tally.newHeads.get(g.serial);
							if (newHead && newHead.familyId !== g.family.id) {
								// A head has one family: the first row that names the head decides it.
								reject(line, `head ${g.serial} is a ${familyCodes.get(newHead.familyId)} head, not ${g.family.code}`, cells);
							} else {
								const headId = knownHead ? knownHead.id : noteNewHead(tally.newHeads, g);
								tally.goodRows++;
								tally.goodReadings += g.readings.length;
								// A key seen before (or a rare hash collision) is checked exactly in SQL, so the
								// whole row goes through the staging table.
								seen.row(`${g.serial}\u0000${g.stage}\u0000${g.cylinder}\u0000${g.side}\u0000${g.valve}\u0000${g.measuredAt}\u0000`);
								let anyDup = false;
								dupFlags.length = 0;
								for (const m of g.readings) {
									const dup = seen.add(m.measurement);
									dupFlags.push(dup);
									anyDup ||= dup;
								}
								if (straightOn && !knownHead && !anyDup) {
									lines.add(line, g.readings.length);
									const prefix = `${opts.shopId}\t${headId}\t${g.family.id}\t${g.stage}\t${g.cylinder}\t${g.side}\t${g.valve}\t`;
									const suffix = `\t${g.measuredAt}\t${esc(g.measuredBy)}\t${esc(g.instrumentId)}\t${batchId}\n`;
									for (const m of g.readings) straight += `${prefix}${m.measurement}\t${m.value}${suffix}`;
								} else {
									if (anyDup) tally.dupCandidates += dupFlags.filter(Boolean).length;
									const prefix = `${line}\t${esc(g.serial)}\t${headId}\t${g.family.id}\t${g.stage}\t${g.cylinder}\t${g.side}\t${g.valve}\t`;
									const suffix = `\t${g.measuredAt}\t${esc(g.measuredBy)}\t${esc(g.instrumentId)}\t${esc(g.mileageKm)}\t${esc(g.customer)}\t\\N\t\\N\t${knownHead ? 't' : 'f'}\t`;
									g.readings.forEach((m, k) => (staged += `${prefix}${m.measurement}\t${m.value}${suffix}${dupFlags[k] ? 't' : 'f'}\n`));
								}
							}
						}
						if (straight.length > 1 << 18) await flushStraight();
						// Staged rows wait in a larger buffer while readings go straight in, so that the
						// connection seldom switches from one COPY to the other.
						if (staged.length > (direct ? 1 << 22 : 1 << 18)) await flushStaged();
						if (batchId && rows % 25_000 === 0) touchBatch(sql, opts.shopId, batchId, rows);
					}
				}
				if (straight) await flushStraight();
				if (staged) await flushStaged();
				await channel.end();
				if (rows === 0) throw new ImportInputError(422, 'The file has a header but no rows.');
			} catch (e) {
				channel.abort(e);
				throw e;
			}
			tm.mark('stream_parse_check_copy');
			const hash = source.hash();
			if (batchId) {
				const [dup] = await t<{ id: string }[]>`
					select id from import_batches where shop_id = ${opts.shopId} and content_hash = ${hash} and status = 'committed' limit 1`;
				if (dup) throw new DuplicateFile(dup.id);
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
			const r = result();
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

/** How often a running import renews its batch's heartbeat, and after how long without one the
 * watch (reapDeadImports) counts the import as dead. */
export const HEARTBEAT_SECONDS = 5;
export const STALE_SECONDS = 30;

/** Renews the batch's heartbeat (and its rows read so far) from outside the import's transaction,
 * whose writes nobody sees before it commits; in the shop's scope, or row-level security hides the
 * row. A renewal that fails is only late: the next one may succeed. */
function touchBatch(sql: postgres.Sql, shopId: string, batchId: string, progressRows?: number) {
	withShopSql(sql, shopId, async (t) => {
		if (progressRows === undefined) await t`update import_batches set heartbeat_at = now() where id = ${batchId} and status = 'running'`;
		else await t`update import_batches set heartbeat_at = now(), progress_rows = ${progressRows} where id = ${batchId} and status = 'running'`;
	}).catch(() => {});
}

function startHeartbeat(sql: postgres.Sql, shopId: string, batchId: string) {
	const timer = setInterval(() => touchBatch(sql, shopId, batchId), HEARTBEAT_SECONDS * 1000);
	timer.unref();
	return timer;
}

class DryRunOutcome extends Error {
	constructor(public outcome: ImportOutcome) {
		super('dry run');
	}
}

function isAbort(e: unknown): boolean {
	const err = e as { code?: string; name?: string; message?: string };
	return err?.code === 'ECONNRESET' || err?.name === 'AbortError' || /aborted|terminated|premature close/i.test(err?.message ?? '');
}

async function markFailed(sql: postgres.Sql, shopId: string, batchId: string | null, message: string) {
	if (!batchId) return;
	await withShopSql(sql, shopId, (t) => t`
		update import_batches set status = 'failed', error = ${message}, finished_at = now()
		where id = ${batchId} and status = 'running'`);
}

async function rememberedMapping(t: postgres.TransactionSql, shopId: string, headers: string[]) {
	const [row] = await t<{ mapping: Record<string, string> }[]>`
		select mapping from import_mappings where shop_id = ${shopId} and signature = ${headerSignature(headers)}`;
	return row?.mapping ?? null;
}

async function rememberMapping(t: postgres.TransactionSql, shopId: string, headers: string[], layout: Layout, mapping: Record<string, string>) {
	await t`
		insert into import_mappings (shop_id, signature, layout, mapping)
		values (${shopId}, ${headerSignature(headers)}, ${layout}, ${JSON.stringify(mapping)}::jsonb)
		on conflict (shop_id, signature) do update set mapping = excluded.mapping, layout = excluded.layout, updated_at = now()`;
}

/**
 * The foreign-key checks the replica-mode COPY skipped, for the whole batch at once: every reading
 * of the batch has its head (of its shop and family), its batch and its instrument, and those
 * instruments are locked as the per-row checks would lock them (FOR KEY SHARE), so none can be
 * deleted before the commit. Heads and batch were created by this transaction: nobody else sees
 * them yet. Anything missing aborts the import; nothing of it is kept.
 */
export async function verifyKeys(t: postgres.TransactionSql, shopId: string, batchId: string): Promise<void> {
	const [r] = await t<{ readings: number; noHead: number; noBatch: number; noInstrument: number }[]>`
		with k as (
			select shop_id, head_id, family_id, batch_id, instrument_id, count(*) as n
			from readings where batch_id = ${batchId}
			group by 1, 2, 3, 4, 5
		), locked as (
			select i.shop_id, i.id from instruments i
			where i.shop_id = ${shopId} and i.id in (select instrument_id from k)
			for key share
		)
		select coalesce(sum(k.n), 0)::int as readings,
			coalesce(sum(k.n) filter (where h.id is null), 0)::int as "noHead",
			coalesce(sum(k.n) filter (where b.id is null), 0)::int as "noBatch",
			coalesce(sum(k.n) filter (where k.instrument_id is not null and l.id is null), 0)::int as "noInstrument"
		from k
		left join heads h on h.shop_id = k.shop_id and h.id = k.head_id and h.family_id = k.family_id
		left join import_batches b on b.shop_id = k.shop_id and b.id = k.batch_id
		left join locked l on l.shop_id = k.shop_id and l.id = k.instrument_id`;
	const missing = [
		r.noHead && `${r.noHead} without their head`,
		r.noBatch && `${r.noBatch} without their batch`,
		r.noInstrument && `${r.noInstrument} with an instrument not on record`
	].filter(Boolean);
	if (missing.length) throw new Error(`The import was stopped before storing anything: of its ${r.readings} readings, ${missing.join(', ')}.`);
}

interface FinishInfo {
	batchId: string | null;
	hash: string;
	layout: Layout;
	bytes: number;
	delimiter: string;
	t0: number;
	tm: ReturnType<typeof timer>;
	tally: Tally;
	/** Lines of the readings COPYed straight into readings. */
	lines: DirectLines;
	path: ImportPath;
}

interface NewHead {
	/** Chosen here, so staged readings carry their head and need no join to find it. */
	id: string;
	familyId: string;
	customer: string | null;
	mileageKm: number | null;
	firstAt: string;
	hasFinal: boolean;
}

interface Tally {
	goodRows: number;
	badRows: number;
	goodReadings: number;
	dupCandidates: number;
	newHeads: Map<string, NewHead>;
}

/** Notes a head the import creates (first row's identity columns win); returns its id. The ids
 * grow with time (UUID version 7), so a file's readings go in at the end of the index on
 * (head, stage, position, measurement, time) instead of all over it. */
function noteNewHead(heads: Map<string, NewHead>, g: GoodRow): string {
	const h = heads.get(g.serial);
	if (!h) {
		const id = uuidv7();
		heads.set(g.serial, { id, familyId: g.family.id, customer: g.customer, mileageKm: g.mileageKm, firstAt: g.measuredAt, hasFinal: g.stage === 'final' });
		return id;
	}
	if (g.measuredAt < h.firstAt) h.firstAt = g.measuredAt;
	if (g.stage === 'final') h.hasFinal = true;
	h.customer ??= g.customer;
	h.mileageKm ??= g.mileageKm;
	return h.id;
}

async function knownSerials(t: postgres.TransactionSql, shopId: string): Promise<Map<string, { id: string }>> {
	const rows = await t<{ serial: string; id: string }[]>`select serial, id from heads where shop_id = ${shopId}`;
	return new Map(rows.map((r) => [r.serial, { id: r.id }]));
}

/**
 * Remembers reading keys in a fixed 16 MB bit table (a Bloom filter with two hashes): a key whose
 * bits are both set already may be a duplicate within the file and is marked for an exact check in
 * SQL. Memory stays flat however large the file; a false alarm only costs that exact check.
 */
class KeySieve {
	private bits = new Uint32Array(1 << 22); // 2^27 bits
	// Two FNV-1a hashes (different offset bases), each finished with MurmurHash3's mixer so that
	// the bits used as the index depend on every character. A key is a row's identity columns
	// followed by a measurement: the identity part is hashed once per row.
	private r1 = 0;
	private r2 = 0;
	row(prefix: string) {
		let h1 = 0x811c9dc5;
		let h2 = 0x050c5d1f;
		for (let i = 0; i < prefix.length; i++) {
			const c = prefix.charCodeAt(i);
			h1 = Math.imul(h1 ^ c, 0x01000193);
			h2 = Math.imul(h2 ^ c, 0x01000193);
		}
		this.r1 = h1;
		this.r2 = h2;
	}
	/** Notes the row's key for this measurement; true when it may have been seen before. */
	add(measurement: string): boolean {
		let h1 = this.r1;
		let h2 = this.r2;
		for (let i = 0; i < measurement.length; i++) {
			const c = measurement.charCodeAt(i);
			h1 = Math.imul(h1 ^ c, 0x01000193);
			h2 = Math.imul(h2 ^ c, 0x01000193);
		}
		const a = this.set(mix(h1));
		const b = this.set(mix(h2));
		return a && b;
	}
	private set(h: number): boolean {
		const idx = h & ((1 << 27) - 1);
		const word = idx >>> 5;
		const bit = 1 << (idx & 31);
		const had = (this.bits[word] & bit) !== 0;
		this.bits[word] |= bit;
		return had;
	}
}

/** MurmurHash3's 32-bit finaliser. */
function mix(h: number): number {
	h ^= h >>> 16;
	h = Math.imul(h, 0x85ebca6b);
	h ^= h >>> 13;
	h = Math.imul(h, 0xc2b2ae35);
	return (h ^ (h >>> 16)) >>> 0;
}

/** Everything after the file is read: checks across rows, then the writes. */
async function finish(t: postgres.TransactionSql, opts: ImportOptions, info: FinishInfo): Promise<ImportOutcome> {
	const { shopId } = opts;
	const { tally } = info;
	// Statistics for the planner before any join on the staging table.
	await t`analyze import_stage`;
	info.tm.mark('sql_analyze');

	// Lines rejected by checks across rows.
	const sqlRejected = new Set<number>();
	if (tally.dupCandidates > 0) {
		// The same reading twice in the file: the later row is rejected whole. Only keys the
		// sieve flagged are compared; first, staged readings with each other.
		const within = await t<{ line: number; first: number }[]>`
			with cand as (
				select distinct serial, stage, cylinder, side, valve, measurement, measured_at from import_stage where dup
			), k as (
				select s.line, min(s.line) over (partition by s.serial, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.measured_at) as first_line
				from import_stage s join cand c using (serial, stage, cylinder, side, valve, measurement, measured_at)
				where s.reason is null
			)
			select line, min(first_line) as first from k where line <> first_line group by line`;
		const firstLine = new Map(within.map((r) => [r.line, r.first]));
		if (info.lines.readings > 0) {
			// Then with the readings that went straight in. Such a reading is always its key's first
			// occurrence: a row goes straight in only when none of its keys was seen before. (A new
			// head has no readings but this batch's; the lookup goes by head, through the identity
			// index.)
			const hits = await t<{ line: number; id: string }[]>`
				select s.line, r.id from import_stage s
				join readings r on r.head_id = s.head_id and r.stage = s.stage and r.cylinder = s.cylinder and r.side = s.side
					and r.valve = s.valve and r.measurement = s.measurement and r.measured_at = s.measured_at
				where s.dup and not s.known and s.reason is null`;
			if (hits.length) {
				// The batch's readings went in in the order of the file, so a reading's rank among
				// them (by id, which grows) gives its line.
				const ranks = await t<{ id: string; n: number }[]>`
					select id, n from (select id, (row_number() over (order by id))::int as n from readings where batch_id = ${info.batchId}) x
					where id = any(${hits.map((h) => h.id)}::bigint[])`;
				const rank = new Map(ranks.map((r) => [r.id, r.n]));
				for (const h of hits) {
					const line = info.lines.lineOf(rank.get(h.id)!);
					firstLine.set(h.line, Math.min(firstLine.get(h.line) ?? line, line));
				}
			}
		}
		if (firstLine.size) {
			const rows = await t<{ line: number }[]>`
				update import_stage s set reason = 'the same reading as line ' || d.first || ' (duplicate key in the file)'
				from unnest(${[...firstLine.keys()]}::int[], ${[...firstLine.values()]}::int[]) as d(line, first)
				where s.line = d.line and s.ctid = (select min(x.ctid) from import_stage x where x.line = d.line)
				returning s.line`;
			for (const r of rows) sqlRejected.add(r.line);
		}
	}
	info.tm.mark('sql_duplicates_in_file');
	// A head that exists already keeps its family (compared once per head, not per reading).
	if (tally.goodRows > 0) {
		const rows = await t<{ line: number }[]>`
			with mismatch as (
				select d.serial, d.family_id, f.code as head_code, sf.code as file_code
				from (select distinct serial, family_id from import_stage where known and reason is null) d
				join heads h on h.shop_id = ${shopId} and h.serial = d.serial and h.family_id <> d.family_id
				join families f on f.id = h.family_id
				join families sf on sf.id = d.family_id
			)
			update import_stage s set reason = 'head ' || s.serial || ' is a ' || m.head_code || ' head, not ' || m.file_code
			from mismatch m where s.known and s.serial = m.serial and s.family_id = m.family_id and s.reason is null
			returning s.line`;
		for (const r of rows) sqlRejected.add(r.line);
	}
	info.tm.mark('sql_family_check');

	// A row is rejected whole: every reading of a line rejected above is left out, and the
	// rejected line gets a plain rendering of what was read.
	let droppedReadings = 0;
	if (sqlRejected.size) {
		const lines = [...sqlRejected];
		const marked = await t`update import_stage set bad = true where line = any(${lines}::int[]) and serial is not null`;
		droppedReadings = marked.count;
		await t`
			update import_stage set raw = concat_ws(${info.delimiter}, serial, stage, cylinder, side, valve, measurement, value, measured_at, measured_by)
			where line = any(${lines}::int[]) and reason is not null and raw is null`;
	}
	info.tm.mark('sql_mark_rejected');

	const accepted = tally.goodRows - sqlRejected.size;
	const rejected = tally.badRows + sqlRejected.size;
	const candidates = tally.goodReadings - droppedReadings;
	const rejects = await t<RejectSample[]>`
		select distinct on (line) line, reason, raw from import_stage where reason is not null order by line limit 50`;
	info.tm.mark('sql_rejects');

	const base: ImportResult = {
		batchId: info.batchId,
		dryRun: opts.dryRun,
		layout: info.layout,
		accepted,
		rejected,
		readings: 0,
		duplicates: 0,
		createdHeads: 0,
		duplicateOf: null,
		rejects,
		bytes: info.bytes,
		seconds: 0
	};
	const aborting = rejected > 0 && opts.onReject === 'abort';

	if (opts.dryRun) {
		// What would be stored: every good reading of a new head, and those of known heads
		// that are not stored yet.
		const [would] = await t<{ existing: number }[]>`
			select count(*)::int as existing
			from import_stage s
			join readings r on r.head_id = s.head_id and r.stage = s.stage and r.cylinder = s.cylinder and r.side = s.side
				and r.valve = s.valve and r.measurement = s.measurement and r.measured_at = s.measured_at
			where s.known and s.reason is null and not s.bad`;
		base.readings = candidates - would.existing;
		base.duplicates = would.existing;
		base.createdHeads = tally.newHeads.size;
		base.seconds = (performance.now() - info.t0) / 1000;
		throw new DryRunOutcome({ status: 200, result: base });
	}

	const batchId = info.batchId!;
	if (rejected > 0) {
		await t`
			insert into import_rejects (shop_id, batch_id, line, raw, reason)
			select distinct on (line) ${shopId}::uuid, ${batchId}::uuid, line, coalesce(raw, ''), reason
			from import_stage where reason is not null order by line`;
	}

	if (aborting) {
		// Readings that went straight in before the first reject was known go again.
		if (info.lines.readings > 0) await t`delete from readings where shop_id = ${shopId} and batch_id = ${batchId}`;
		const message = `${rejected} row${rejected === 1 ? '' : 's'} rejected; nothing was imported (rejected rows abort this import).`;
		await t`
			update import_batches set status = 'failed', error = ${message}, content_hash = ${info.hash}, rows_accepted = ${accepted},
				rows_rejected = ${rejected}, bytes = ${info.bytes}, progress_rows = ${accepted + rejected}, finished_at = now()
			where id = ${batchId}`;
		base.seconds = (performance.now() - info.t0) / 1000;
		return { status: 422, result: base, message };
	}

	// Heads that do not exist yet, from the identity columns of their first row.
	let createdHeads = 0;
	if (tally.newHeads.size) {
		const serials = [...tally.newHeads.keys()];
		const hs = [...tally.newHeads.values()];
		const created = await t`
			insert into heads (id, shop_id, family_id, serial, customer, received_on, mileage_km, status, created_by_batch)
			select i, ${shopId}::uuid, f, s, coalesce(c, ''), a::timestamptz::date, m,
				case when fin = 't' then 'final_check'::head_status else 'inspected'::head_status end, ${batchId}::uuid
			from unnest(${hs.map((h) => h.id)}::uuid[], ${serials}::text[], ${hs.map((h) => h.familyId)}::uuid[], ${hs.map((h) => h.customer)}::text[],
				${hs.map((h) => h.firstAt)}::text[], ${hs.map((h) => h.mileageKm)}::int[], ${hs.map((h) => (h.hasFinal ? 't' : 'f'))}::text[]) as x(i, s, f, c, a, m, fin)`;
		createdHeads = created.count;
		// Many new heads can change the table's size by orders of magnitude (a new shop's first
		// file): fresh statistics keep the foreign-key checks on index scans.
		if (createdHeads >= 100) await t`analyze heads`;
	}
	info.tm.mark('sql_insert_heads');

	// New heads cannot have stored readings yet: a plain insert. Known heads may: identical
	// readings are skipped and counted as duplicates.
	const fresh = await t`
		insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id)
		select ${shopId}::uuid, s.head_id, s.family_id, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.value, s.measured_at, s.measured_by, s.instrument_id, ${batchId}::uuid
		from import_stage s
		where not s.known and s.reason is null and not s.bad`;
	const again = await t`
		insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id)
		select ${shopId}::uuid, s.head_id, s.family_id, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.value, s.measured_at, s.measured_by, s.instrument_id, ${batchId}::uuid
		from import_stage s
		where s.known and s.reason is null and not s.bad
		on conflict on constraint readings_identity_key do nothing`;
	info.tm.mark('sql_insert_readings');
	if (sqlRejected.size && createdHeads) {
		// A new head whose every row was rejected above was created for nothing.
		const gone = await t`
			delete from heads h where h.created_by_batch = ${batchId} and not exists (select 1 from readings r where r.head_id = h.id)`;
		createdHeads -= gone.count;
	}

	if (info.path === 'direct-replica' && info.lines.readings > 0) {
		await verifyKeys(t, shopId, batchId);
		info.tm.mark('sql_verify_keys');
	}

	base.readings = info.lines.readings + fresh.count + again.count;
	base.duplicates = candidates - base.readings;
	base.createdHeads = createdHeads;
	await t`
		update import_batches set status = 'committed', content_hash = ${info.hash}, layout = ${info.layout},
			rows_accepted = ${accepted}, rows_rejected = ${rejected}, readings = ${base.readings},
			duplicates = ${base.duplicates}, created_heads = ${base.createdHeads}, bytes = ${info.bytes},
			progress_rows = ${accepted + rejected}, finished_at = now()
		where id = ${batchId}`;
	await t`
		insert into audit_log (shop_id, actor_user_id, actor_label, entity, entity_id, action, after)
		values (${shopId}, ${opts.actor.userId}, ${opts.actor.label}, 'import', ${batchId}, 'import',
			${JSON.stringify({ fileName: opts.fileName, accepted, rejected, readings: base.readings, duplicates: base.duplicates, createdHeads: base.createdHeads })}::jsonb)`;
	info.tm.mark('sql_batch_audit');
	base.timings = info.tm.timings;
	base.path = info.path;
	base.seconds = (performance.now() - info.t0) / 1000;
	return { status: 201, result: base };
}

/**
 * Marks batches whose import died (server killed, database restarted) as failed: running, no
 * heartbeat for `staleSeconds`, and the import's lock free (an import whose transaction is still
 * open in the database holds it, however late its heartbeat). Every server runs this on a timer
 * (startImportWatch); it looks across shops.
 */
export async function reapDeadImports(sql: postgres.Sql, staleSeconds = STALE_SECONDS): Promise<number> {
	const stale = await withSystemSql(sql, async (t) => {
		return t<{ id: string; shop_id: string }[]>`
			select id, shop_id from import_batches where status = 'running' and heartbeat_at < now() - make_interval(secs => ${staleSeconds})`;
	});
	let reaped = 0;
	for (const b of stale) {
		const done = await withShopSql(sql, b.shop_id, async (t) => {
			const [{ free }] = await t<{ free: boolean }[]>`select pg_try_advisory_xact_lock(${LOCK_CLASS}, hashtext(${b.id})) as free`;
			if (!free) return 0;
			const r = await t`
				update import_batches set status = 'failed', finished_at = now(),
					error = 'The import stopped before it finished (the server or the database restarted). Nothing from it was stored.'
				where id = ${b.id} and status = 'running' and heartbeat_at < now() - make_interval(secs => ${staleSeconds})`;
			return r.count;
		});
		reaped += done;
	}
	return reaped;
}
