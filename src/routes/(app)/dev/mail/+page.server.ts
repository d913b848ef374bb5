import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { readableMail } from '$lib/server/services/dev-mail';
import type { PageServerLoad } from './$types';

// Only with the local fake mail server in demo or development mode (404 otherwise), and only the
// mail the owner may read: their own, and their current shop's to its own people.
export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	const messages = await orError(() => readableMail(actor));
	return { messages: messages.map(({ id, receivedAt, to, subject }) => ({ id, receivedAt, to, subject })) };
};
