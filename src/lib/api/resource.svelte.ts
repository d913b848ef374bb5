// JSON fetched from the browser whenever its URL changes (a page's filters live in its URL):
// the last answer stays shown while the next one loads, a stale request is aborted and its
// answer dropped, and an error keeps the server's message. Call it while a component
// initialises.
//
// The request is a derived promise: it follows `url()` (and a retry) by itself, with no effect
// copying state around; only its settling writes the answer shown.
import { onDestroy } from 'svelte';
import { browser } from '$app/environment';
import { getJson } from './client';

export interface Resource<T> {
	readonly data: T | null;
	readonly error: string | null;
	readonly loading: boolean;
	retry(): void;
}

interface Request<T> {
	promise: Promise<T>;
	abort: () => void;
}

interface Answer<T> {
	request: Request<T>;
	data: T | null;
	error: string | null;
}

export function resource<T>(url: () => string | null): Resource<T> {
	let attempt = $state(0);
	let answer = $state.raw<Answer<T> | null>(null);
	let previous: Request<T> | null = null;

	const request = $derived.by<Request<T> | null>(() => {
		void attempt;
		const u = url();
		previous?.abort();
		previous = null;
		// Never on the server: the page renders its loading state and the browser asks.
		if (u === null || !browser) return null;
		const ctl = new AbortController();
		const req: Request<T> = {
			promise: getJson<T>(u, (input, init) => fetch(input, { ...init, signal: ctl.signal })),
			abort: () => ctl.abort()
		};
		req.promise.then(
			(data) => {
				if (!ctl.signal.aborted) answer = { request: req, data, error: null };
			},
			(e: unknown) => {
				if (!ctl.signal.aborted) answer = { request: req, data: null, error: e instanceof Error ? e.message : String(e) };
			}
		);
		previous = req;
		return req;
	});
	onDestroy(() => previous?.abort());

	return {
		get data() {
			// No URL, no data; otherwise the last answer, kept while the next one loads.
			return request === null && browser ? null : (answer?.data ?? null);
		},
		get error() {
			return request !== null && answer?.request === request ? answer.error : null;
		},
		get loading() {
			return browser ? request !== null && answer?.request !== request : true;
		},
		retry: () => attempt++
	};
}
