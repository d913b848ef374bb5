import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { mailFakeDir } from '$lib/server/env';
import { listFakeMail } from '$lib/server/mail/fake-inbox';
import type { PageServerLoad } from './$types';

// Only while the local fake mail server is in use; with a real SMTP server there is no inbox here.
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'owner');
	if (!mailFakeDir) error(404, 'Not found');
	const messages = await listFakeMail(mailFakeDir);
	return { messages: messages.map(({ id, receivedAt, to, subject }) => ({ id, receivedAt, to, subject })) };
};
