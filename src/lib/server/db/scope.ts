// The one mechanism that scopes database work to a shop. Every request's queries run inside
// `withShop`, which opens a transaction and sets `lapmark.shop_id` for its duration; the
// row-level security policies (drizzle/0001_row_level_security.sql) then hide every other
// shop's rows, so a query that forgets its shop filter still cannot read or write across shops.
import type postgres from 'postgres';
import type { Db } from './client';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
/** A client or a transaction: query functions accept either. */
export type Conn = Db | Tx;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The postgres.js side of a scoped transaction: COPY, cursors and hand-written SQL run on it,
 * inside the same transaction (and so the same scope) as the Drizzle work beside them. */
export type ScopedSql = postgres.TransactionSql;
export type ScopedWork<T> = (tx: Tx, sql: ScopedSql) => Promise<T>;

function checkShopId(shopId: string) {
	if (typeof shopId !== 'string' || !UUID.test(shopId)) throw new Error('withShop needs a shop id');
}

/** Work in one transaction scoped to `shopId`. `work` gets the Drizzle transaction and the same
 * transaction's postgres.js client (for COPY and cursors). */
export async function withShop<T>(db: Db, shopId: string, work: ScopedWork<T>): Promise<T> {
	checkShopId(shopId);
	return db.transaction((tx) => scoped(tx, 'lapmark.shop_id', shopId, work));
}

/**
 * For the few paths that must look across shops before a shop is known: signing in, resolving
 * a membership, accepting an invitation, seeding. Keep its uses few and obvious.
 */
export async function withSystem<T>(db: Db, work: ScopedWork<T>): Promise<T> {
	return db.transaction((tx) => scoped(tx, 'lapmark.system', 'on', work));
}

/** Options of a raw postgres.js transaction, e.g. 'read only isolation level repeatable read'. */
export type TxMode = string;

/**
 * The same scope on a bare postgres.js client, for paths that use no Drizzle at all (a streamed
 * export, the import's own connection, the archive): one transaction scoped to `shopId`.
 */
export async function withShopSql<T>(sql: postgres.Sql, shopId: string, work: (t: ScopedSql) => Promise<T>, mode?: TxMode): Promise<T> {
	checkShopId(shopId);
	const run = (t: ScopedSql) => pipelined(t, 'lapmark.shop_id', shopId, () => work(t));
	return (mode ? sql.begin(mode, run) : sql.begin(run)) as Promise<T>;
}

/** withSystem on a bare postgres.js client. */
export async function withSystemSql<T>(sql: postgres.Sql, work: (t: ScopedSql) => Promise<T>): Promise<T> {
	return sql.begin((t) => pipelined(t, 'lapmark.system', 'on', () => work(t))) as Promise<T>;
}

/**
 * Moves an open transaction into `shopId`'s scope: for the one transaction that writes several
 * shops in turn (seeding the demo). Awaited, so the scope is in force before the caller's next
 * statement.
 */
export async function enterScope(t: ScopedSql, shopId: string): Promise<void> {
	checkShopId(shopId);
	await t`select set_config('lapmark.system', '', true), set_config('lapmark.shop_id', ${shopId}, true)`;
}

/**
 * Sets `name` for the transaction, then runs the work. The setting goes to the connection at once,
 * before `work` can send anything: postgres.js keeps a connection's queries in order and
 * pipelines them, so the work's first query follows it without waiting for its answer (a round
 * trip saved on every request), and still runs with the setting in force. Should the setting
 * fail, the transaction is aborted, every later query fails and the whole is rolled back.
 */
async function pipelined<T>(client: ScopedSql, name: 'lapmark.shop_id' | 'lapmark.system', value: string, work: () => Promise<T>): Promise<T> {
	const set = client`select set_config(${name}, ${value}, true)`.execute();
	const [, result] = await Promise.all([set, work()]);
	return result;
}

async function scoped<T>(tx: Tx, name: 'lapmark.shop_id' | 'lapmark.system', value: string, work: ScopedWork<T>): Promise<T> {
	// Drizzle's postgres.js transaction keeps the postgres.js transaction in session.client.
	const client = (tx as unknown as { session?: { client?: ScopedSql } }).session?.client;
	if (typeof client !== 'function') throw new Error('withShop/withSystem need a Drizzle postgres.js database');
	return pipelined(client, name, value, () => work(tx, client));
}
