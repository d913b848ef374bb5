// The import's one COPY at a time on its transaction's connection: straight into readings as the
// role lapmark_import (drizzle/0006), or into the staging table, switching between the two.
//
// Where the role may also set session_replication_role (scripts/pg.sh grants it), the COPY into
// readings runs in replica mode: no per-row foreign-key checks, which were half of the database's
// work; the summary triggers fire in every mode (drizzle/0007), and verifyKeys
// (queries/import-finish.ts) checks every reading of the batch before the commit.
import { once } from 'node:events';
import type { Writable } from 'node:stream';
import type postgres from 'postgres';
import type { GoodRow } from './rows';

/** The staging table's columns, in the order the rows written for it give them. */
const STAGE_COLUMNS =
	'line, serial, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, mileage, customer, reason, raw, known, dup';

/** One field in COPY text format. */
export function esc(v: string | number | null): string {
	if (v === null) return '\\N';
	const s = String(v);
	return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n').replace(/\r/g, '\\r') : s;
}

/** Columns of a reading COPYed straight into readings; shop and batch are the import's own. */
const READING_COLUMNS = 'shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id';

/** The role that may COPY into readings (it bypasses row-level security and may only insert
 * readings; scripts/pg.sh creates it, drizzle/0006 grants it). */
export const IMPORT_ROLE = 'lapmark_import';

export type CopyTarget = 'readings' | 'stage';

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

// The rows each COPY takes, in COPY text format, in the order of its columns above.

/** A rejected line for the staging table: its reason and the row as read. */
export function stagedReject(line: number, reason: string, raw: string): string {
	return `${line}\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t\\N\t${esc(reason)}\t${esc(raw.slice(0, 4000))}\tf\tf\n`;
}

/** A good row's readings straight into readings. */
export function directReadings(shopId: string, headId: string, g: GoodRow, batchId: string | null): string {
	const prefix = `${shopId}\t${headId}\t${g.family.id}\t${g.stage}\t${g.cylinder}\t${g.side}\t${g.valve}\t`;
	const suffix = `\t${g.measuredAt}\t${esc(g.measuredBy)}\t${esc(g.instrumentId)}\t${batchId}\n`;
	let text = '';
	for (const m of g.readings) text += `${prefix}${m.measurement}\t${m.value}${suffix}`;
	return text;
}

/** A good row's readings for the staging table; `dup[k]`: the k-th reading's key may have been
 * seen before in the file. */
export function stagedReadings(line: number, headId: string, g: GoodRow, known: boolean, dup: boolean[]): string {
	const prefix = `${line}\t${esc(g.serial)}\t${headId}\t${g.family.id}\t${g.stage}\t${g.cylinder}\t${g.side}\t${g.valve}\t`;
	const suffix = `\t${g.measuredAt}\t${esc(g.measuredBy)}\t${esc(g.instrumentId)}\t${esc(g.mileageKm)}\t${esc(g.customer)}\t\\N\t\\N\t${known ? 't' : 'f'}\t`;
	let text = '';
	g.readings.forEach((m, k) => (text += `${prefix}${m.measurement}\t${m.value}${suffix}${dup[k] ? 't' : 'f'}\n`));
	return text;
}
