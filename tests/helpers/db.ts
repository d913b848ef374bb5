// Test helpers for the real test database that `npm test` starts and migrates.
import { randomUUID } from 'node:crypto';
import { Readable } from 'node:stream';
import { sql as raw } from 'drizzle-orm';
import type postgres from 'postgres';
import { expect } from 'vitest';
import { createDb } from '../../src/lib/server/db/client';
import { withSystem } from '../../src/lib/server/db/scope';
import { families, shops } from '../../src/lib/server/db/schema';
import { runImport } from '../../src/lib/server/import/run';

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

/** The three ways the import writes readings: straight in (in replica mode or not) and staged. */
const IMPORT_WAYS = ['direct-replica', 'staged', 'direct'] as const;

/**
 * Imports one file each way through runImport (`file(way, i)` writes the i-th), checks each
 * stored `readings` readings the way it was asked to (staged when the cluster has no import
 * role), runs `after` after each, and returns the three batches.
 */
export async function importEachWay(
	sql: postgres.Sql,
	shopId: string,
	opts: { label: string; readings: number; file: (way: (typeof IMPORT_WAYS)[number], i: number) => string; after: () => Promise<unknown> }
): Promise<string[]> {
	const [{ role }] = await sql`select exists (select 1 from pg_roles where rolname = 'lapmark_import') as role`;
	const batches: string[] = [];
	for (const [i, way] of IMPORT_WAYS.entries()) {
		const direct = way !== 'staged';
		const out = await runImport(sql, Readable.from([Buffer.from(opts.file(way, i))]), {
			shopId,
			actor: { userId: null, label: opts.label },
			fileName: `${opts.label}-${i}.csv`,
			dryRun: false,
			onReject: 'abort',
			limitBytes: 1 << 24,
			now: new Date('2026-12-01T00:00:00Z'),
			direct,
			replica: way === 'direct-replica'
		});
		expect(out.status).toBe(201);
		expect(out.result.path).toBe(role ? way : 'staged');
		expect(out.result.readings).toBe(opts.readings);
		batches.push(out.result.batchId!);
		await opts.after();
	}
	return batches;
}
