// Database tests run against the real PostgreSQL that `npm test` started and migrated.
import postgres from 'postgres';

export default async function setup() {
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set: run the database tests through `npm test`.');
	const sql = postgres(url, { max: 1, onnotice: () => {} });
	try {
		await sql`select 1 from readings limit 1`;
	} finally {
		await sql.end();
	}
}
