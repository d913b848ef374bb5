import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { limitsInForce, listFamilies } from '$lib/server/queries/families';
import type { RequestHandler } from './$types';

/** The shop's engine families, their layout and the limits in force today, so a file can be
 * prepared against them. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const { fams, lims } = await withShop(db, actor.shopId, async (tx) => ({
		fams: await listFamilies(tx, actor.shopId),
		lims: await limitsInForce(tx, actor.shopId)
	}));
	return json({
		families: fams.map((f) => ({
			id: f.id,
			code: f.code,
			description: f.description,
			cylinders: f.cylinders,
			intakeValvesPerCylinder: f.intakeValves,
			exhaustValvesPerCylinder: f.exhaustValves,
			nominalStemMm: { intake: f.intakeStemMm, exhaust: f.exhaustStemMm },
			limits: lims
				.filter((l) => l.familyId === f.id)
				.map(({ familyId: _f, ...l }) => l)
		}))
	});
};
