// What the analysis pages need from the server before the browser fetches their charts: the
// shop's families (for pickers, filters and layouts). Everything heavier is fetched by the charts.
// Also the families as GET /api/v1/families lists them, with the limits in force.
import type { RequestEvent } from '@sveltejs/kit';
import type { FamiliesResponse } from '$lib/contract';
import type { Role } from '$lib/measurements';
import { requireRole } from '../auth/guards';
import { inShop } from '../db';
import { limitsInForce, listFamilies } from '../queries/families';

export type FamilyChoice = { id: string; code: string; description: string | null; cylinders: number; intakeValves: number; exhaustValves: number };

export async function familyChoices(shopId: string): Promise<FamilyChoice[]> {
	const rows = await inShop(shopId, (tx) => listFamilies(tx, shopId));
	return rows.map((f) => ({ id: f.id, code: f.code, description: f.description, cylinders: f.cylinders, intakeValves: f.intakeValves, exhaustValves: f.exhaustValves }));
}

/** A page's load: refuses roles below `least`, then lists the families for its filters. */
export async function familiesFor(event: RequestEvent, least: Role): Promise<{ families: FamilyChoice[] }> {
	const actor = requireRole(event, least);
	return { families: await familyChoices(actor.shopId) };
}

/** The shop's engine families, their layout and the limits in force today, so a file can be
 * prepared against them (GET /api/v1/families). */
export async function familiesWithLimits(shopId: string): Promise<FamiliesResponse> {
	const { fams, lims } = await inShop(shopId, async (tx) => ({ fams: await listFamilies(tx, shopId), lims: await limitsInForce(tx, shopId) }));
	return {
		families: fams.map((f) => ({
			id: f.id,
			code: f.code,
			description: f.description,
			cylinders: f.cylinders,
			intakeValvesPerCylinder: f.intakeValves,
			exhaustValvesPerCylinder: f.exhaustValves,
			nominalStemMm: { intake: f.intakeStemMm, exhaust: f.exhaustStemMm },
			limits: lims.filter((l) => l.familyId === f.id).map(({ familyId: _f, ...l }) => l as FamiliesResponse['families'][number]['limits'][number])
		}))
	};
}
