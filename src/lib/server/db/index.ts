// The app's database client, built once from the validated environment.
import { env } from '../env';
import { createDb } from './client';

export const { db, sql } = createDb(env.DATABASE_URL);
export { isDatabaseUnavailable } from './client';
export type { Db } from './client';
