// The statistics as the API routes ask for them: each opens the shop's scope (inShop) and runs
// the topic's function in it. Kept apart from index.ts so scripts that bring their own database
// (the statistics benchmark) can use the engine without the app's client.
import { inShop } from '../../db';
import type { Conn } from '../../db/scope';
import { capabilityByMachinist, capabilityStudy } from './capability';
import { checkReading } from './check';
import type { ControlBaseline } from '../../../contract';
import type { BaselineForm } from '../../../schemas/stats';
import type { Who } from '../entry';
import { control, pchart, recomputeBaseline } from './control';
import { compare, distribution } from './distribution';
import { firstPass } from './first-pass';
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
export const firstPassFor = scoped(firstPass);
export const capabilityFor = scoped(capabilityStudy);
export const capabilityByMachinistFor = scoped(capabilityByMachinist);
export const controlFor = scoped(control);
export const pchartFor = scoped(pchart);
export const wearFor = scoped(wear);

/** Recomputes a family × series' control limits from a period, in the shop's scope. */
export const recomputeBaselineFor = (shopId: string, who: Who, f: BaselineForm): Promise<ControlBaseline> =>
	inShop(shopId, (tx) => recomputeBaseline(tx, shopId, who, f));
