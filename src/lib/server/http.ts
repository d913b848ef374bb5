// Small helpers for +server.ts handlers: parse a query string or a bounded JSON body, or answer
// 400/413 with a message that says what to send instead.
import { error } from '@sveltejs/kit';
import type { z } from 'zod';
import { issuesMessage, queryObject } from '../schemas/stats';

/** The query string parsed by `schema`; a 400 naming the bad parameters otherwise. */
export function parseQuery<S extends z.ZodType>(schema: S, url: URL): z.output<S> {
	const r = schema.safeParse(queryObject(url.searchParams));
	if (!r.success) error(400, issuesMessage(r.error.issues));
	return r.data;
}

/**
 * The request body as JSON, read up to `maxBytes` (413 beyond, without reading the rest);
 * 400 when it is not JSON.
 */
export async function readJsonBody(request: Request, maxBytes: number, tooLarge: string): Promise<unknown> {
	const declared = Number(request.headers.get('content-length') ?? 0);
	if (declared > maxBytes) error(413, tooLarge);
	if (!request.body) error(400, 'Send a JSON body.');
	const reader = request.body.getReader();
	const chunks: Uint8Array[] = [];
	let size = 0;
	for (;;) {
		const { done, value } = await reader.read();
		if (done) break;
		size += value.byteLength;
		if (size > maxBytes) {
			await reader.cancel();
			error(413, tooLarge);
		}
		chunks.push(value);
	}
	const text = Buffer.concat(chunks).toString('utf8');
	if (text.trim() === '') error(400, 'Send a JSON body.');
	try {
		return JSON.parse(text);
	} catch {
		error(400, 'The body is not valid JSON.');
	}
}
