// Writes the generated demo into PostgreSQL in one transaction: small tables with ordinary
// inserts, the large ones (heads, readings, decisions, leak-down) through COPY FROM STDIN.
// Either the whole demo is there afterwards or none of it is. Each shop's rows are written with
// lapmark.shop_id set to that shop, so the row-level security policies accept them.
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import bcrypt from 'bcryptjs';
import type postgres from 'postgres';
import { enterScope, withSystemSql } from '../db/scope';
import { generateDemo, type DemoCounts, type DemoData, type DemoOptions, type DemoSignIn, type HeadRow } from './generate';

export interface SeedOptions extends DemoOptions {
	/** Already generated data for these options (saves generating twice). */
	data?: DemoData;
	/** Run ANALYZE on the loaded tables after the commit, so the first queries plan well. */
	analyze?: boolean;
	/** Progress lines, for stderr. */
	log?: (message: string) => void;
}

export interface SeedResult {
	counts: DemoCounts;
	/** Sum of all rows written. */
	rows: number;
	signIns: DemoSignIn[];
	/** Generation, hashing and the transaction (ANALYZE not included). */
	elapsedMs: number;
	analyzeMs: number;
}

/** True when the database holds no shop yet. */
export async function isDatabaseEmpty(sql: postgres.Sql): Promise<boolean> {
	// Row-level security hides every shop unless the query looks across shops.
	return withSystemSql(sql, async (tx) => {
		const [row] = await tx<{ empty: boolean }[]>`select not exists (select 1 from shops) as empty`;
		return row.empty;
	});
}

/** Rows with camelCase keys → snake_case column names, as postgres.js inserts them. */
function snake<T extends object>(rows: readonly T[], extra: Record<string, unknown> = {}): Record<string, unknown>[] {
	return rows.map((r) => {
		const out: Record<string, unknown> = {};
		for (const [k, v] of Object.entries(r)) out[k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)] = v;
		return Object.assign(out, extra);
	});
}

// Bind parameters per statement are capped at 65535; chunks stay well below that.
async function insert<T extends object>(tx: postgres.TransactionSql, table: string, rows: readonly T[]): Promise<void> {
	const mapped = snake(rows);
	for (let i = 0; i < mapped.length; i += 1000) {
		await tx`insert into ${tx(table)} ${tx(mapped.slice(i, i + 1000) as never)}`;
	}
}

/** One field in COPY text format: \N for null, backslash escapes for the special characters. */
function field(v: string | number | boolean | null | undefined): string {
	if (v == null) return '\\N';
	const s = String(v);
	return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n').replace(/\r/g, '\\r') : s;
}

/** Joins lines into chunks of about 64 KB: far fewer stream writes than one per row. */
function* chunked(lines: Iterable<string>): Generator<string> {
	let buf = '';
	for (const line of lines) {
		buf += line;
		if (buf.length >= 65536) {
			yield buf;
			buf = '';
		}
	}
	if (buf) yield buf;
}

/**
 * Bulk-loads rows given as COPY text lines. PostgreSQL refuses COPY FROM into a table with
 * row-level security, so the lines go into a temporary table first and reach the real table
 * through one INSERT … SELECT, which the policies check like any insert.
 */
async function copy(
	tx: postgres.TransactionSql,
	table: string,
	columns: readonly string[],
	lines: Iterable<string>,
	log: (m: string) => void
): Promise<void> {
	// Table and column names are constants of this module, never input.
	const cols = columns.join(', ');
	const stage = `demo_stage_${table}`;
	await tx.unsafe(`create temp table ${stage} on commit drop as select ${cols} from ${table} with no data`);
	const writable = await tx.unsafe(`copy ${stage} (${cols}) from stdin`).writable();
	const t0 = performance.now();
	await pipeline(Readable.from(chunked(lines)), writable);
	const t1 = performance.now();
	const done = await tx.unsafe(`insert into ${table} (${cols}) select ${cols} from ${stage}`);
	await tx.unsafe(`drop table ${stage}`);
	log(`  ${table}: ${done.count} rows (copy ${Math.round(t1 - t0)} ms, insert ${Math.round(performance.now() - t1)} ms)`);
}

function* headLines(heads: readonly HeadRow[]): Generator<string> {
	for (const h of heads) {
		yield [
			h.id,
			h.shopId,
			h.familyId,
			field(h.serial),
			field(h.customer),
			field(h.customerEmail),
			h.receivedOn,
			field(h.releasedOn),
			field(h.mileageKm),
			field(h.engineHours),
			field(h.complaint),
			h.status,
			field(h.comebackOf),
			// The job was entered when the head arrived.
			`${h.receivedOn}T08:00:00Z`
		].join('\t') + '\n';
	}
}

/** Seeds the demo into an empty (or at least non-conflicting) database, in one transaction. */
export async function seedDemo(sql: postgres.Sql, opts: SeedOptions): Promise<SeedResult> {
	const t0 = performance.now();
	const log = opts.log ?? (() => {});
	const data = opts.data ?? generateDemo(opts);
	log(`generated in ${Math.round(performance.now() - t0)} ms`);

	// bcrypt (cost 10, as the app signs in with) is slow in plain JS: it runs while the server
	// is busy with the bulk inserts, and the hashes are filled in at the end.
	const passwordOf = new Map(data.signIns.map((s) => [s.email, s.password]));
	const hashing = Promise.all(data.users.map((u) => bcrypt.hash(passwordOf.get(u.email)!, 10)));
	hashing.catch(() => {});

	await sql.begin(async (tx) => {
		await insert(tx, 'user', data.users);
		for (const shop of data.shops) {
			const mine = <T extends { shopId: string }>(rows: readonly T[]) => rows.filter((r) => r.shopId === shop.id);
			// Row-level security keys on this setting; `true` keeps it local to the transaction.
			await enterScope(tx, shop.id);
			await tx`insert into shops ${tx({ id: shop.id, name: shop.name, slug: shop.slug, settings: tx.json(shop.settings) } as never)}`;
			await insert(tx, 'memberships', data.memberships.filter((m) => m.shopId === shop.id));
			await insert(tx, 'families', mine(data.families));
			await insert(tx, 'limits', mine(data.limits));
			await insert(tx, 'instruments', mine(data.instruments));
			await insert(tx, 'api_tokens', mine(data.apiTokens));

			const t = performance.now();
			await copy(
				tx,
				'heads',
				['id', 'shop_id', 'family_id', 'serial', 'customer', 'customer_email', 'received_on', 'released_on', 'mileage_km', 'engine_hours', 'complaint', 'status', 'comeback_of', 'created_at'],
				headLines(mine(data.heads)),
				log
			);
			await copy(
				tx,
				'readings',
				['shop_id', 'head_id', 'family_id', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'measured_at', 'measured_by', 'instrument_id'],
				(function* () {
					for (const r of data.readings(shop.id)) {
						yield `${r.shopId}\t${r.headId}\t${r.familyId}\t${r.stage}\t${r.cylinder}\t${r.side}\t${r.valve}\t${r.measurement}\t${r.value}\t${r.measuredAt}\t${field(r.measuredBy)}\t${r.instrumentId ?? '\\N'}\n`;
					}
				})(),
				log
			);
			await copy(
				tx,
				'decisions',
				['id', 'shop_id', 'head_id', 'cylinder', 'side', 'valve', 'suggested', 'rule', 'kind', 'note', 'decided_by', 'decided_at'],
				(function* () {
					for (const d of mine(data.decisions)) {
						yield `${d.id}\t${d.shopId}\t${d.headId}\t${d.cylinder}\t${d.side}\t${d.valve}\t${d.suggested}\t${field(d.rule)}\t${d.kind}\t${field(d.note)}\t${field(d.decidedBy)}\t${d.decidedAt}\n`;
					}
				})(),
				log
			);
			await copy(
				tx,
				'cylinder_leakage',
				['id', 'shop_id', 'head_id', 'cylinder', 'leakage_pct', 'pressure_in_kpa', 'pressure_held_kpa', 'leak_path'],
				(function* () {
					for (const l of mine(data.cylinderLeakage)) {
						yield `${l.id}\t${l.shopId}\t${l.headId}\t${l.cylinder}\t${l.leakagePct}\t${field(l.pressureInKpa)}\t${field(l.pressureHeldKpa)}\t${l.leakPath}\n`;
					}
				})(),
				log
			);
			log(`${shop.slug}: bulk tables copied in ${Math.round(performance.now() - t)} ms`);
		}
		const hashes = await hashing;
		for (const [i, u] of data.users.entries()) {
			await tx`update "user" set password_hash = ${hashes[i]} where id = ${u.id}`;
		}
	});
	const elapsedMs = performance.now() - t0;

	let analyzeMs = 0;
	if (opts.analyze) {
		const ta = performance.now();
		// VACUUM also sets the visibility map, so the covering indexes answer without table reads.
		await sql`vacuum (analyze) heads, readings, decisions, cylinder_leakage`;
		analyzeMs = performance.now() - ta;
	}
	const rows = Object.values(data.counts).reduce((a, b) => a + b, 0);
	return { counts: data.counts, rows, signIns: data.signIns, elapsedMs, analyzeMs };
}
