import { error, json } from '@sveltejs/kit';
import { importListSchema, importQuerySchema } from '$lib/schemas/imports';
import { requireRole } from '$lib/server/auth/guards';
import { uploadLimitBytes } from '$lib/server/env';
import { errorJson } from '$lib/server/http';
import { CSV_TYPES, ImportInputError, importCsv, listImports } from '$lib/server/services/imports';
import type { RequestHandler } from './$types';

function badQuery(issues: { path: PropertyKey[]; message: string }[]): never {
	error(400, issues.map((i) => i.message).join('; '));
}

/** The shop's import batches, newest first (`clientRef` finds one that is still running). */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const q = importListSchema.safeParse(Object.fromEntries(event.url.searchParams));
	if (!q.success) badQuery(q.error.issues);
	const batches = await listImports(actor.shopId, { clientRef: q.data.clientRef });
	return json({ batches });
};

/** Import a CSV sent as the request body (or, with dryRun, check it and store nothing). */
export const POST: RequestHandler = async (event) => {
	const actor = requireRole(event, 'machinist');
	const q = importQuerySchema.safeParse(Object.fromEntries(event.url.searchParams));
	if (!q.success) badQuery(q.error.issues);
	const type = (event.request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
	if (!CSV_TYPES.includes(type)) {
		return json({ message: `Send the file as the request body with Content-Type: text/csv (got "${type || 'none'}").` }, { status: 415 });
	}
	const length = Number(event.request.headers.get('content-length') ?? 0);
	if (length > uploadLimitBytes) {
		return json({ message: `The file is larger than the limit of ${Math.round(uploadLimitBytes / 1024 / 1024)} MB.` }, { status: 413 });
	}
	if (!event.request.body) return json({ message: 'The file is empty.' }, { status: 422 });
	try {
		const outcome = await importCsv(event.request.body, {
			shopId: actor.shopId,
			actor: { userId: actor.userId, label: actor.email },
			fileName: q.data.fileName ?? 'upload.csv',
			layout: q.data.layout,
			dryRun: q.data.dryRun,
			onReject: q.data.onReject,
			mapping: q.data.mapping,
			clientRef: q.data.clientRef
		});
		const r = outcome.result;
		const body = {
			batchId: r.batchId,
			dryRun: r.dryRun,
			layout: r.layout,
			accepted: r.accepted,
			rejected: r.rejected,
			readings: r.readings,
			duplicates: r.duplicates,
			createdHeads: r.createdHeads,
			duplicateOf: r.duplicateOf,
			rejects: r.rejects.slice(0, 20),
			bytes: r.bytes,
			seconds: Math.round(r.seconds * 1000) / 1000,
			timings: r.timings,
			path: r.path,
			onReject: outcome.onReject,
			onRejectFrom: outcome.onRejectFrom,
			...('message' in outcome ? { message: outcome.message } : {})
		};
		return json(body, { status: outcome.status });
	} catch (e) {
		// A file refused as a whole: `{ message, …details }` (the header read, say) with its status.
		if (e instanceof ImportInputError) return errorJson(e);
		throw e;
	}
};
