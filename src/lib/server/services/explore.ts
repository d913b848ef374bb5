// The explore page's readings table: one page of the readings a URL's filters select, sorted as
// it asks, and the counts per measurement and stage beside it.
import type { ReadingsQuery } from '$lib/schemas/readings';
import { inShop } from '../db';
import { isDomainError } from '../errors';
import { countsOf, readingSelection, readingsPageOf } from './readings';

/** A refusal (a DomainError) as its status and message; null for anything else. */
export function refusalOf(e: unknown): { status: number; message: string } | null {
	return isDomainError(e) ? { status: e.status, message: e.message } : null;
}

/** The table and counts; a family that is gone (an old bookmark) is said in `problem` rather
 * than failing the page. */
export async function exploreReadings(shopId: string, q: ReadingsQuery) {
	try {
		return await inShop(shopId, async (tx) => {
			const sel = await readingSelection(tx, shopId, q);
			const [table, counts] = await Promise.all([readingsPageOf(tx, shopId, q, sel), countsOf(tx, shopId, sel)]);
			return { table, counts, problem: null };
		});
	} catch (e) {
		const refused = refusalOf(e);
		if (refused?.status === 404) return { table: null, counts: [], problem: refused.message };
		throw e;
	}
}
