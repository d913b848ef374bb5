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

export async function withShop<T>(db: Db, shopId: string, work: (tx: Tx) => Promise<T>): Promise<T> {
	if (!UUID.test(shopId)) throw new Error('withShop needs a shop id');
	return db.transaction((tx) => scoped(tx, 'lapmark.shop_id', shopId, work));
}

/**
 * For the few paths that must look across shops before a shop is known: signing in, resolving
 * a membership, accepting an invitation, seeding. Keep its uses few and obvious.
 */
export async function withSystem<T>(db: Db, work: (tx: Tx) => Promise<T>): Promise<T> {
	return db.transaction((tx) => scoped(tx, 'lapmark.system', 'on', work));
}

/**
 * Sets `name` for the transaction, then runs the work. The setting goes to the connection at once,
 * before `work` can send anything: postgres.js keeps a connection's queries in order and
 * pipelines them, so the work's first query follows it without waiting for its answer (a round
 * trip saved on every request), and still runs with the setting in force. Should the setting
 * fail, the transaction is aborted, every later query fails and the whole is rolled back.
 */
async function scoped<T>(tx: Tx, name: 'lapmark.shop_id' | 'lapmark.system', value: string, work: (tx: Tx) => Promise<T>): Promise<T> {
	// Drizzle's postgres.js transaction keeps the postgres.js transaction in session.client.
	const client = (tx as unknown as { session?: { client?: postgres.TransactionSql } }).session?.client;
	if (typeof client !== 'function') throw new Error('withShop/withSystem need a Drizzle postgres.js database');
	const set = client`select set_config(${name}, ${value}, true)`.execute();
	const [, result] = await Promise.all([set, work(tx)]);
	return result;
}
