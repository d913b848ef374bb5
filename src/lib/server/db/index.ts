// The app's database client, built once from the validated environment.
import { env } from '../env';
import { createDb } from './client';
import { withShop, withSystem, type ScopedWork } from './scope';

export const { db, sql } = createDb(env.DATABASE_URL);
export { isDatabaseUnavailable } from './client';
export type { Db } from './client';

/** Work scoped to one shop on the app's database: what services call (routes call services). */
export function inShop<T>(shopId: string, work: ScopedWork<T>): Promise<T> {
	return withShop(db, shopId, work);
}

/** Work across shops on the app's database (sign-in, invitations): keep its uses few. */
export function inSystem<T>(work: ScopedWork<T>): Promise<T> {
	return withSystem(db, work);
}
