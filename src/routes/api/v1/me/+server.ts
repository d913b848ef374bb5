import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import type { RequestHandler } from './$types';

/** Who the session or token acts as: handy for checking a token works. */
export const GET: RequestHandler = (event) => {
	const a = requireRole(event, 'viewer');
	return json({ user: { id: a.userId, email: a.email, name: a.name }, shop: { id: a.shopId, name: a.shopName }, role: a.role, via: a.via });
};
