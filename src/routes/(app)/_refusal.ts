// The signed-in pages' form actions share this mapping of a service's refusal: a record that is
// not there (404, or a status in `page`) is the error page, as the page's load answers it; any
// other refusal is the form's failure, shaped by `shape` as that form shows it.
import { error, fail } from '@sveltejs/kit';
import { isDomainError, type DomainError } from '$lib/server/errors';

export async function orRefuse<T, F extends Record<string, unknown>>(work: () => Promise<T>, shape: (e: DomainError) => F, page: readonly number[] = [404]) {
	try {
		return await work();
	} catch (e) {
		if (!isDomainError(e)) throw e;
		if (page.includes(e.status)) error(e.status, e.message);
		return fail(e.status, shape(e));
	}
}
