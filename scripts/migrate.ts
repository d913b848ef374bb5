// Applies the committed Drizzle migrations in drizzle/ to DATABASE_URL.
import { migrate } from 'drizzle-orm/postgres-js/migrator';
import { createDb } from '../src/lib/server/db/client';

export async function runMigrations(url: string): Promise<void> {
	const { db, sql } = createDb(url, { max: 1 });
	try {
		await migrate(db, { migrationsFolder: new URL('../drizzle', import.meta.url).pathname });
	} finally {
		await sql.end();
	}
}

if (import.meta.url === `file://${process.argv[1]}`) {
	const url = process.env.DATABASE_URL;
	if (!url) {
		console.error('DATABASE_URL is not set');
		process.exit(2);
	}
	const t0 = performance.now();
	await runMigrations(url);
	console.log(`[db] migrations applied (${Math.round(performance.now() - t0)} ms)`);
}
