// Builds a Drizzle client over postgres.js. Free of SvelteKit imports so that scripts,
// benchmarks and tests build their own client against the database they were given.
import { drizzle, type PostgresJsDatabase } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import * as schema from './schema';

export type Schema = typeof schema;
export type Db = PostgresJsDatabase<Schema>;
export type Sql = postgres.Sql;

export function createDb(url: string, options: postgres.Options<Record<string, never>> = {}) {
	const sql = postgres(url, {
		max: 10,
		onnotice: () => {},
		...options,
		connection: {
			application_name: 'lapmark',
			// Imports stage whole files in temporary tables; PostgreSQL's default of 8 MB of
			// temporary buffers sends a large staging table to disk. Allocated only when used.
			temp_buffers: '256MB',
			...options.connection
		}
	});
	const db = drizzle(sql, { schema, casing: 'snake_case' });
	return { db, sql };
}
