// Small helpers the head routes share: a route's id parameter, and who is acting.
import { error } from '@sveltejs/kit';
import type { ShopActor } from './auth/guards';
import type { Who } from './services/entry';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The id in the URL, or 404: a malformed id names nothing, the same as another shop's id. */
export function idParam(value: string | undefined, what = 'head'): string {
	if (!value || !UUID.test(value)) error(404, `No such ${what} in this shop.`);
	return value.toLowerCase();
}

/** The person acting, as readings (their name) and the audit log (their e-mail) record them. */
export function whoIs(actor: ShopActor): Who {
	return { userId: actor.userId, label: actor.email, name: (actor.name ?? '').trim() || actor.email };
}
