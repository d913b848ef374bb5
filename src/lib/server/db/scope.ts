// The one mechanism that scopes database work to a shop. Every request's queries run inside
// `withShop`, which opens a transaction and sets `lapmark.shop_id` for its duration; the
// row-level security policies (drizzle/0001_row_level_security.sql) then hide every other
// shop's rows, so a query that forgets its shop filter still cannot read or write across shops.
import { sql as raw } from 'drizzle-orm';
import type { Db } from './client';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
/** A client or a transaction: query functions accept either. */
export type Conn = Db | Tx;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function withShop<T>(db: Db, shopId: string, work: (tx: Tx) => Promise<T>): Promise<T> {
	if (!UUID.test(shopId)) throw new Error('withShop needs a shop id');
	return db.transaction(async (tx) => {
		await tx.execute(raw`select set_config('lapmark.shop_id', ${shopId}, true)`);
		return work(tx);
	});
}

/**
 * For the few paths that must look across shops before a shop is known: signing in, resolving
 * a token or a membership, accepting an invitation, seeding. Keep its uses few and obvious.
 */
export async function withSystem<T>(db: Db, work: (tx: Tx) => Promise<T>): Promise<T> {
	return db.transaction(async (tx) => {
		await tx.execute(raw`select set_config('lapmark.system', 'on', true)`);
		return work(tx);
	});
}
