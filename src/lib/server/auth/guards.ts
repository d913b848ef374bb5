// Guards every +page.server.ts load and action and every +server.ts handler calls first.
// The hook in hooks.server.ts applies the same policy by route; these make each handler say
// what it needs, so a route moved out from under the hook still refuses.
import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/measurements';
import { roleAtLeast } from './access';
import type { Actor } from './actor';

export type ShopActor = Actor & { shopId: string; shopName: string; role: Role };

function isApi(event: RequestEvent) {
	return event.url.pathname.startsWith('/api/');
}

export function signInRedirect(event: RequestEvent): never {
	const back = event.url.pathname + event.url.search;
	redirect(303, `/signin?redirectTo=${encodeURIComponent(back)}`);
}

/** Any signed-in user (a shop is not needed). */
export function requireUser(event: RequestEvent): Actor {
	const actor = event.locals.actor;
	if (!actor) {
		if (isApi(event)) error(401, 'Sign in or send a valid API token.');
		signInRedirect(event);
	}
	return actor;
}

/** A member of the active shop holding at least `least`. */
export function requireRole(event: RequestEvent, least: Role): ShopActor {
	const actor = requireUser(event);
	if (!actor.shopId || !actor.role || !actor.shopName) error(403, 'You are not a member of any shop yet.');
	if (!roleAtLeast(actor.role, least)) error(403, `This needs the ${least} role or higher; you are ${actor.role}.`);
	return actor as ShopActor;
}
