import type { SubmitFunction } from '@sveltejs/kit';

/**
 * For `use:enhance`: marks the form busy from the submit until SvelteKit has applied the answer,
 * so its button can say "Saving…" and stay disabled meanwhile. `options` go to `update()`
 * (e.g. `{ reset: false }` keeps what was typed when the server refuses it).
 */
export function busyWhile(set: (busy: boolean) => void, options?: { reset?: boolean }): SubmitFunction {
	return () => {
		set(true);
		return async ({ update }) => {
			await update(options);
			set(false);
		};
	};
}
