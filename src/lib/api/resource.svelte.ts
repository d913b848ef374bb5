// JSON fetched from the browser whenever its URL changes (a page's filters live in its URL):
// the last answer stays shown while the next one loads, a stale answer is dropped, and an
// error keeps the server's message. Call it while a component initialises.
import { getJson } from './client';

export interface Resource<T> {
	readonly data: T | null;
	readonly error: string | null;
	readonly loading: boolean;
	retry(): void;
}

export function resource<T>(url: () => string | null): Resource<T> {
	let data = $state<T | null>(null);
	let error = $state<string | null>(null);
	let loading = $state(true);
	let attempt = $state(0);
	$effect(() => {
		void attempt;
		const u = url();
		if (u === null) {
			loading = false;
			data = null;
			return;
		}
		const ctl = new AbortController();
		loading = true;
		error = null;
		getJson<T>(u, (input, init) => fetch(input, { ...init, signal: ctl.signal })).then(
			(d) => {
				if (ctl.signal.aborted) return;
				data = d;
				loading = false;
			},
			(e: unknown) => {
				if (ctl.signal.aborted) return;
				error = e instanceof Error ? e.message : String(e);
				data = null;
				loading = false;
			}
		);
		return () => ctl.abort();
	});
	return {
		get data() {
			return data;
		},
		get error() {
			return error;
		},
		get loading() {
			return loading;
		},
		retry: () => attempt++
	};
}
