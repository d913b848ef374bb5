import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { linksIn } from '$lib/server/mail/fake-inbox';
import { readableMessage } from '$lib/server/services/dev-mail';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	const message = await orError(() => readableMessage(actor, event.params.id));
	return { message: { ...message, html: undefined }, links: linksIn(message.text) };
};
