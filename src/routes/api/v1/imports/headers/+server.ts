import { error, json } from '@sveltejs/kit';
import { mappingRequestSchema } from '$lib/schemas/imports';
import { requireRole } from '$lib/server/auth/guards';
import { headerAdvice } from '$lib/server/services/imports';
import type { RequestHandler } from './$types';

/** The mapping step: given a file's header row, what Lapmark understands, what it suggests for
 * the rest, and the mapping remembered for these headers. */
export const POST: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	let input: unknown;
	try {
		input = await event.request.json();
	} catch {
		error(400, 'Send JSON: {"headers": ["…", …]}');
	}
	const parsed = mappingRequestSchema.safeParse(input);
	if (!parsed.success) error(400, parsed.error.issues.map((i) => `${i.path.join('.') || 'body'}: ${i.message}`).join('; '));
	return json(await headerAdvice(actor.shopId, parsed.data.headers, parsed.data.layout));
};
