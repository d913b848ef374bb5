import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { audit } from '$lib/server/queries/audit';
import { firstRejects, getBatch, undoBatch } from '$lib/server/queries/imports';
import type { RequestHandler } from './$types';

const idSchema = z.uuid();

export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = idSchema.safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	const found = await withShop(db, actor.shopId, async (tx) => {
		const batch = await getBatch(tx, actor.shopId, id.data);
		return batch ? { ...batch, rejects: await firstRejects(tx, actor.shopId, id.data) } : null;
	});
	if (!found) error(404, 'No such import.');
	return json(found);
};

/** Undo: the batch's readings are removed, and heads it created that nothing else uses. */
export const DELETE: RequestHandler = async (event) => {
	const actor = requireRole(event, 'engineer');
	const id = idSchema.safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	const result = await withShop(db, actor.shopId, async (tx) => {
		const r = await undoBatch(tx, actor.shopId, id.data);
		if (r.ok) {
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'import', entityId: id.data, action: 'undo', before: { status: 'committed' }, after: { status: 'undone', readingsRemoved: r.readingsRemoved, headsRemoved: r.headsRemoved } });
		}
		return r;
	});
	if (!result.ok) error(result.status, result.message);
	return json({ batchId: id.data, status: 'undone', readingsRemoved: result.readingsRemoved, headsRemoved: result.headsRemoved });
};
