// What the analysis pages need from the server before the browser fetches their charts: the
// shop's families (for pickers, filters and layouts). Everything heavier is fetched by the charts.
import type { RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/measurements';
import { requireRole } from '../auth/guards';
import { db } from '../db';
import { withShop } from '../db/scope';
import { listFamilies } from '../queries/families';

export type FamilyChoice = { id: string; code: string; description: string | null; cylinders: number; intakeValves: number; exhaustValves: number };

export async function familyChoices(shopId: string): Promise<FamilyChoice[]> {
	const rows = await withShop(db, shopId, (tx) => listFamilies(tx, shopId));
	return rows.map((f) => ({ id: f.id, code: f.code, description: f.description, cylinders: f.cylinders, intakeValves: f.intakeValves, exhaustValves: f.exhaustValves }));
}

/** A page's load: refuses roles below `least`, then lists the families for its filters. */
export async function familiesFor(event: RequestEvent, least: Role): Promise<{ families: FamilyChoice[] }> {
	const actor = requireRole(event, least);
	return { families: await familyChoices(actor.shopId) };
}
