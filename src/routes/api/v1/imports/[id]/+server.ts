import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { importBatch, undoImport } from '$lib/server/services/imports';
import type { RequestHandler } from './$types';

const idSchema = z.uuid();

export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = idSchema.safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	return json(await orError(() => importBatch(actor.shopId, id.data)));
};

/** Undo: the batch's readings are removed, and heads it created that nothing else uses. */
export const DELETE: RequestHandler = async (event) => {
	const actor = requireRole(event, 'engineer');
	const id = idSchema.safeParse(event.params.id);
	if (!id.success) error(404, 'No such import.');
	const result = await orError(() => undoImport(actor.shopId, { userId: actor.userId, label: actor.email }, id.data));
	return json({ batchId: id.data, status: 'undone', readingsRemoved: result.readingsRemoved, headsRemoved: result.headsRemoved });
};
