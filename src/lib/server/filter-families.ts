// The shop's engine families as a FilterBar lists them (code and description), for the
// +page.server.ts loads of the analytics pages.
import { db } from './db';
import { withShop } from './db/scope';
import { listFamilies } from './queries/families';

export async function filterFamilies(shopId: string): Promise<{ code: string; description: string }[]> {
	const rows = await withShop(db, shopId, (tx) => listFamilies(tx, shopId));
	return rows.map((f) => ({ code: f.code, description: f.description }));
}
