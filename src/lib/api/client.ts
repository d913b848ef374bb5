// Browser-side fetch for Lapmark's own API: JSON in, typed JSON out, errors as Error with the
// server's message.
export class ApiError extends Error {
	constructor(
		public status: number,
		message: string
	) {
		super(message);
	}
}

export async function getJson<T>(path: string, fetcher: typeof fetch = fetch): Promise<T> {
	const res = await fetcher(path, { headers: { accept: 'application/json' } });
	if (!res.ok) {
		let message = `${res.status} ${res.statusText}`;
		try {
			const body = await res.json();
			if (body?.message) message = body.message;
		} catch {
			/* not JSON */
		}
		throw new ApiError(res.status, message);
	}
	return res.json() as Promise<T>;
}
