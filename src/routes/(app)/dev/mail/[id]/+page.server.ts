import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { mailFakeDir } from '$lib/server/env';
import { linksIn, readFakeMail } from '$lib/server/mail/fake-inbox';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'owner');
	if (!mailFakeDir) error(404, 'Not found');
	const message = await readFakeMail(mailFakeDir, event.params.id);
	if (!message) error(404, 'No such message.');
	return { message: { ...message, html: undefined }, links: linksIn(message.text) };
};
