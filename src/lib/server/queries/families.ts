import { and, asc, desc, eq, ne, sql } from 'drizzle-orm';
import type { Measurement, Side, Stage } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { families, limits, users } from '../db/schema';

export async function listFamilies(conn: Conn, shopId: string) {
	return conn.select().from(families).where(eq(families.shopId, shopId)).orderBy(asc(families.code));
}

export type LimitInForce = {
	familyId: string;
	measurement: string;
	side: 'intake' | 'exhaust';
	stage: 'as_received' | 'final';
	min: number | null;
	max: number | null;
	effectiveFrom: string;
};

/** The limit versions in force on `day` (default today), one per family × measurement × side × stage. */
export async function limitsInForce(conn: Conn, shopId: string, day?: string): Promise<LimitInForce[]> {
	return conn.execute<LimitInForce>(sql`
		select distinct on (family_id, measurement, side, stage)
			family_id as "familyId", measurement, side, stage, min, max, effective_from::text as "effectiveFrom"
		from limits
		where shop_id = ${shopId} and effective_from <= coalesce(${day ?? null}::date, current_date)
		order by family_id, measurement, side, stage, effective_from desc`);
}

export async function familyById(conn: Conn, shopId: string, id: string) {
	const [row] = await conn.select().from(families).where(and(eq(families.shopId, shopId), eq(families.id, id))).limit(1);
	return row ?? null;
}

export async function familyCodeTaken(conn: Conn, shopId: string, code: string, exceptId?: string) {
	const [row] = await conn
		.select({ id: families.id })
		.from(families)
		.where(and(eq(families.shopId, shopId), sql`lower(${families.code}) = lower(${code})`, exceptId ? ne(families.id, exceptId) : undefined))
		.limit(1);
	return Boolean(row);
}

export async function insertFamily(conn: Conn, v: typeof families.$inferInsert) {
	const [row] = await conn.insert(families).values(v).returning();
	return row;
}

export async function updateFamily(conn: Conn, shopId: string, id: string, v: Partial<typeof families.$inferInsert>) {
	const [row] = await conn
		.update(families)
		.set(v)
		.where(and(eq(families.shopId, shopId), eq(families.id, id)))
		.returning();
	return row ?? null;
}

/** Heads per family, and how many of them have readings (a family in use keeps its layout). */
export async function familyUsage(conn: Conn, shopId: string) {
	const rows = await conn.execute<{ family_id: string; heads: number }>(sql`
		select family_id, count(*)::int as heads from heads where shop_id = ${shopId} group by family_id`);
	return new Map(rows.map((r) => [r.family_id, r.heads]));
}

/** Every limit version of a family, newest first within each measurement × side × stage. */
export async function limitVersions(conn: Conn, shopId: string, familyId: string) {
	return conn
		.select({
			id: limits.id,
			measurement: limits.measurement,
			side: limits.side,
			stage: limits.stage,
			min: limits.min,
			max: limits.max,
			effectiveFrom: limits.effectiveFrom,
			note: limits.note,
			createdAt: limits.createdAt,
			createdBy: users.name
		})
		.from(limits)
		.leftJoin(users, eq(users.id, limits.createdBy))
		.where(and(eq(limits.shopId, shopId), eq(limits.familyId, familyId)))
		.orderBy(asc(limits.stage), asc(limits.measurement), asc(limits.side), desc(limits.effectiveFrom));
}

/**
 * A new limit version from `effectiveFrom` on. A second change on the same day replaces that
 * day's version (returned as `replaced`), so a day has one version.
 */
export async function saveLimitVersion(
	conn: Conn,
	v: { shopId: string; familyId: string; measurement: Measurement; side: Side; stage: Stage; min: number | null; max: number | null; effectiveFrom: string; note: string; createdBy: string }
) {
	const [same] = await conn
		.select()
		.from(limits)
		.where(
			and(
				eq(limits.shopId, v.shopId),
				eq(limits.familyId, v.familyId),
				eq(limits.measurement, v.measurement),
				eq(limits.side, v.side),
				eq(limits.stage, v.stage),
				eq(limits.effectiveFrom, v.effectiveFrom)
			)
		)
		.limit(1);
	if (same) {
		const [row] = await conn.update(limits).set({ min: v.min, max: v.max, note: v.note, createdBy: v.createdBy, createdAt: sql`now()` }).where(eq(limits.id, same.id)).returning();
		return { row, replaced: same };
	}
	const [row] = await conn.insert(limits).values(v).returning();
	return { row, replaced: null };
}
