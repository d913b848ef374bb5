import { requireUser } from '$lib/server/auth/guards';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = (event) => {
	const actor = requireUser(event);
	return {
		actor: {
			name: actor.name,
			email: actor.email,
			shopId: actor.shopId,
			shopName: actor.shopName,
			role: actor.role,
			memberships: actor.memberships.map((m) => ({ shopId: m.shopId, shopName: m.shopName, role: m.role }))
		}
	};
};
