// The one error type of the domain. A service that refuses a request (no such head, a value out
// of range, a conflict with the head's state) throws a DomainError; it knows nothing of HTTP
// beyond the status its refusal means. Routes turn it into a response in one place
// (`$lib/server/http`: `orError` for loads and handlers, `orFail` for form actions,
// `errorJson` for the API), so a refusal reads the same on a page, in a form and in JSON.

export type RefusalStatus = 400 | 403 | 404 | 409 | 413 | 415 | 422 | 429;

export class DomainError extends Error {
	constructor(
		public readonly status: RefusalStatus,
		message: string,
		/** Messages per form field or per cell, shown beside what they are about. */
		public readonly fields: Record<string, string> = {},
		/** Anything else the answer carries (a JSON body's extra keys, an action's extra data). */
		public readonly details: Record<string, unknown> = {}
	) {
		super(message);
		this.name = 'DomainError';
	}

	/** The answer's body, as SvelteKit's HttpError has it (`{ message }`). */
	get body(): { message: string } {
		return { message: this.message };
	}
}

export const isDomainError = (e: unknown): e is DomainError => e instanceof DomainError;

/** The request itself is wrong (a bad value, nothing to save). */
export const invalid = (message: string, fields?: Record<string, string>, details?: Record<string, unknown>) => new DomainError(400, message, fields, details);
/** Nothing of that id in this shop (another shop's id reads the same). */
export const notFound = (message: string) => new DomainError(404, message);
/** The request clashes with the record's state (a released head, a duplicate). */
export const conflict = (message: string, fields?: Record<string, string>, details?: Record<string, unknown>) => new DomainError(409, message, fields, details);
/** The person may do this kind of thing, but not this one. */
export const forbidden = (message: string) => new DomainError(403, message);
/** Well-formed but cannot be processed (an empty file, a header without rows). */
export const unprocessable = (message: string, details?: Record<string, unknown>) => new DomainError(422, message, {}, details);
