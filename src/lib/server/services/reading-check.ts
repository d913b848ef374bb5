// One reading checked against the limits and the fleet, as the check page answers a complete
// query string before any script runs (the same verdict as GET /api/v1/check).
import type { CheckQuery } from '$lib/schemas/stats';
import { inShop } from '../db';
import { refusalOf } from './explore';
import { checkReading } from './stats';

/** The verdict, or the refusal's message as `problem`. */
export async function checkVerdict(shopId: string, q: CheckQuery): Promise<{ result: Awaited<ReturnType<typeof checkReading>> | null; problem: string | null }> {
	try {
		return { result: await inShop(shopId, (tx) => checkReading(tx, shopId, q)), problem: null };
	} catch (e) {
		const refused = refusalOf(e);
		if (!refused) throw e;
		return { result: null, problem: refused.message };
	}
}
