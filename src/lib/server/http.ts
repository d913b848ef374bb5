// Small helpers for routes: parse a query string or a bounded JSON body, or answer 400/413 with a
// message that says what to send instead; and the one mapper from a DomainError to a response.
import { error, fail, json, type ActionFailure } from '@sveltejs/kit';
import { isDomainError, type DomainError } from './errors';
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

// ---- DomainError → response: the one mapper ------------------------------------------------

/** Runs `work`; a DomainError becomes SvelteKit's error page (or the API's JSON error) with its
 * status and message. For loads and +server.ts handlers. Other errors pass through. */
export async function orError<T>(work: () => Promise<T>): Promise<T> {
	try {
		return await work();
	} catch (e) {
		if (isDomainError(e)) error(e.status, e.message);
		throw e;
	}
}

/**
 * Runs a form action's `work`. A DomainError whose status is in `page` (404 by default: the
 * record is not there, as the page's load would answer) becomes the error page; any other is the
 * form's failure, `fail(status, shape(e))`, shaped as that form shows its refusals (by default
 * `{ message, errors }`).
 */
export async function orFail<T, F extends Record<string, unknown> = { message: string; errors: Record<string, string> }>(
	work: () => Promise<T>,
	shape: (e: DomainError) => F = (e) => ({ message: e.message, errors: e.fields }) as unknown as F,
	page: readonly number[] = [404]
): Promise<T | ActionFailure<F>> {
	try {
		return await work();
	} catch (e) {
		if (!isDomainError(e)) throw e;
		if (page.includes(e.status)) error(e.status, e.message);
		return fail(e.status, shape(e));
	}
}

/** A DomainError as the API's JSON answer: `{ message, …details, errors? }` with its status. */
export function errorJson(e: DomainError, headers?: HeadersInit): Response {
	const body: Record<string, unknown> = { message: e.message, ...e.details };
	if (Object.keys(e.fields).length) body.errors = e.fields;
	return json(body, { status: e.status, headers });
}
