// The shop's engine families as a FilterBar lists them (code and description), for the
// +page.server.ts loads of the analytics pages, after the page's role check.
import type { RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/measurements';
import { requireRole } from './auth/guards';
import { db } from './db';
import { withShop } from './db/scope';
import { listFamilies } from './queries/families';

export type FamilyChoice = { code: string; description: string };

export async function filterFamilies(shopId: string): Promise<FamilyChoice[]> {
	const rows = await withShop(db, shopId, (tx) => listFamilies(tx, shopId));
	return rows.map((f) => ({ code: f.code, description: f.description }));
}

/** A page's load: refuses roles below `least`, then lists the families for its filters. */
export async function familiesFor(event: RequestEvent, least: Role): Promise<{ families: FamilyChoice[] }> {
	const actor = requireRole(event, least);
	return { families: await filterFamilies(actor.shopId) };
}
