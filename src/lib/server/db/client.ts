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

// Error codes that mean "the database is not there right now" rather than "this query is
// wrong": the socket could not be opened or was closed (postgres.js and Node), or the server is
// shutting down, starting up or in recovery (PostgreSQL's class 57P and 08).
const UNAVAILABLE_CODES = new Set([
	'ECONNREFUSED',
	'ECONNRESET',
	'EPIPE',
	'ETIMEDOUT',
	'CONNECTION_CLOSED',
	'CONNECTION_ENDED',
	'CONNECTION_DESTROYED',
	'CONNECT_TIMEOUT',
	'57P01', // admin_shutdown
	'57P02', // crash_shutdown
	'57P03', // cannot_connect_now
	'08000',
	'08001',
	'08003',
	'08004',
	'08006'
]);

/** True when err (or an error it wraps, as Drizzle and Auth.js do) says the database is down. */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
	if (!err || typeof err !== 'object' || depth > 8) return false;
	const code = (err as { code?: unknown }).code;
	if (typeof code === 'string' && UNAVAILABLE_CODES.has(code)) return true;
	const errors = (err as { errors?: unknown }).errors;
	if (Array.isArray(errors) && errors.some((e) => isDatabaseUnavailable(e, depth + 1))) return true;
	return isDatabaseUnavailable((err as { cause?: unknown }).cause, depth + 1);
}
