import { error, json } from '@sveltejs/kit';
import { mappingRequestSchema } from '$lib/schemas/imports';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { adviseHeaders } from '$lib/server/import/suggest';
import { rememberedMappingFor } from '$lib/server/queries/import-mappings';
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
	const remembered = await withShop(db, actor.shopId, (tx) => rememberedMappingFor(tx, actor.shopId, parsed.data.headers));
	return json({ ...adviseHeaders(parsed.data.headers, parsed.data.layout, remembered), remembered: Boolean(remembered) });
};
