// Test helpers for the real test database that `npm test` starts and migrates.
import { randomUUID } from 'node:crypto';
import { sql as raw } from 'drizzle-orm';
import { createDb } from '../../src/lib/server/db/client';
import { withSystem } from '../../src/lib/server/db/scope';
import { families, shops } from '../../src/lib/server/db/schema';

export function testDb() {
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set: run through `npm test`.');
	return createDb(url, { max: 4 });
}

/** A shop of its own for one test file, so files can run in parallel on one database. */
export async function makeShop(db: ReturnType<typeof testDb>['db'], label = 'test') {
	const slug = `${label}-${randomUUID().slice(0, 8)}`.toLowerCase();
	return withSystem(db, async (tx) => {
		const [shop] = await tx.insert(shops).values({ name: `Test shop ${slug}`, slug }).returning();
		const [family] = await tx
			.insert(families)
			.values({ shopId: shop.id, code: 'TEST-4', description: 'Test family', cylinders: 4, intakeValves: 2, exhaustValves: 2, intakeStemMm: 6, exhaustStemMm: 6 })
			.returning();
		return { shop, family };
	});
}

/** Runs `fn` and returns the PostgreSQL error it raised (or fails if none). */
export async function pgError(fn: () => Promise<unknown>): Promise<{ code: string; constraint?: string; message: string }> {
	try {
		await fn();
	} catch (e) {
		const cause = (e as { cause?: unknown }).cause ?? e;
		const err = cause as { code?: string; constraint_name?: string; message?: string };
		return { code: err.code ?? '', constraint: err.constraint_name, message: err.message ?? String(e) };
	}
	throw new Error('expected the database to refuse this, but it was accepted');
}

export { raw };
