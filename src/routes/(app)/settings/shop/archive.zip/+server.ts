import { Readable } from 'node:stream';
import { requireRole } from '$lib/server/auth/guards';
import { archiveDownload } from '$lib/server/services/shop-archive';
import type { RequestHandler } from './$types';

/** The whole shop as a zip of CSV files, streamed (owner only). */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'owner');
	const day = new Date().toISOString().slice(0, 10);
	const slug = actor.memberships.find((m) => m.shopId === actor.shopId)?.shopSlug ?? 'shop';
	return new Response(Readable.toWeb(archiveDownload(actor.shopId)) as ReadableStream<Uint8Array>, {
		headers: {
			'content-type': 'application/zip',
			'content-disposition': `attachment; filename="lapmark-${slug}-${day}.zip"`,
			'cache-control': 'no-store'
		}
	});
};
