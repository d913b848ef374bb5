// The statistics as the API routes ask for them: each opens the shop's scope (inShop) and runs
// the topic's function in it. Kept apart from index.ts so scripts that bring their own database
// (the statistics benchmark) can use the engine without the app's client.
import { inShop } from '../../db';
import type { Conn } from '../../db/scope';
import { capabilityByMachinist, capabilityStudy } from './capability';
import { checkReading } from './check';
import { control } from './control';
import { compare, distribution } from './distribution';
import { outliers } from './outliers';
import { comebacks, rates } from './rates';
import { wear } from './wear';

/** `work(tx, shopId, q)` in the shop's scope. */
const scoped =
	<Q, R>(work: (conn: Conn, shopId: string, q: Q) => Promise<R>) =>
	(shopId: string, q: Q): Promise<R> =>
		inShop(shopId, (tx) => work(tx, shopId, q));

export const distributionFor = scoped(distribution);
export const compareFor = scoped(compare);
export const checkReadingFor = scoped(checkReading);
export const outliersFor = scoped(outliers);
export const ratesFor = scoped(rates);
export const comebacksFor = scoped(comebacks);
export const capabilityFor = scoped(capabilityStudy);
export const capabilityByMachinistFor = scoped(capabilityByMachinist);
export const controlFor = scoped(control);
export const wearFor = scoped(wear);
