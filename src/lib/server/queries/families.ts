import { asc, eq, sql } from 'drizzle-orm';
import type { Conn } from '../db/scope';
import { families } from '../db/schema';

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
