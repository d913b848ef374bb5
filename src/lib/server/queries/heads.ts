import { and, asc, count, eq, gte, ilike, isNotNull, isNull, lte, or, sql, type SQL } from 'drizzle-orm';
import type { AnyPgColumn } from 'drizzle-orm/pg-core';
import type { Conn } from '../db/scope';
import { comebacks, cylinderLeakage, families, heads, shops, type PositionRef, type ShopSettings } from '../db/schema';

export const HEAD_SORTS = ['serial', 'family', 'customer', 'status', 'received', 'released'] as const;
export type HeadSort = (typeof HEAD_SORTS)[number];

export interface HeadFilter {
	q?: string;
	family?: string;
	status?: (typeof heads.status.enumValues)[number];
	from?: string;
	to?: string;
	comeback?: 'only' | 'none';
	sort: HeadSort;
	dir: 'asc' | 'desc';
	page: number;
	pageSize: number;
}

export interface HeadFlags {
	/** Valve positions with a current as-received / final reading outside the limits of its day. */
	outAsReceived: number;
	outFinal: number;
	/** Current readings taken with a gauge whose calibration had run out. */
	lapsedGauge: number;
}

function likePattern(q: string) {
	return `%${q.replace(/[%_\\]/g, '\\$&')}%`;
}

const SORT_COLUMNS: Record<HeadSort, SQL | AnyPgColumn> = {
	serial: heads.serial,
	family: sql`${families.code}`,
	customer: heads.customer,
	status: heads.status,
	received: heads.receivedOn,
	released: heads.releasedOn
};

export async function listHeads(conn: Conn, shopId: string, f: HeadFilter) {
	const where: SQL[] = [eq(heads.shopId, shopId)];
	if (f.q) where.push(or(ilike(heads.serial, likePattern(f.q)), ilike(heads.customer, likePattern(f.q)), ilike(heads.complaint, likePattern(f.q)))!);
	if (f.family) where.push(eq(heads.familyId, f.family));
	if (f.status) where.push(eq(heads.status, f.status));
	if (f.from) where.push(gte(heads.receivedOn, f.from));
	if (f.to) where.push(lte(heads.receivedOn, f.to));
	if (f.comeback === 'only') where.push(isNotNull(heads.comebackOf));
	if (f.comeback === 'none') where.push(isNull(heads.comebackOf));
	const cond = and(...where);
	const col = SORT_COLUMNS[f.sort];
	const order = f.dir === 'asc' ? sql`${col} asc nulls last` : sql`${col} desc nulls last`;
	const [{ total }] = await conn.select({ total: count() }).from(heads).innerJoin(families, eq(families.id, heads.familyId)).where(cond);
	const original = sql<string | null>`(select o.serial from heads o where o.id = ${heads.comebackOf})`;
	const cameBack = sql<number>`(select count(*)::int from heads c where c.comeback_of = ${heads.id})`;
	const rows = await conn
		.select({
			id: heads.id,
			serial: heads.serial,
			familyId: heads.familyId,
			familyCode: families.code,
			customer: heads.customer,
			status: heads.status,
			receivedOn: heads.receivedOn,
			releasedOn: heads.releasedOn,
			comebackOf: heads.comebackOf,
			comebackOfSerial: original,
			cameBack,
			overridden: sql<boolean>`${heads.releaseOverrideReason} is not null`
		})
		.from(heads)
		.innerJoin(families, eq(families.id, heads.familyId))
		.where(cond)
		.orderBy(order, asc(heads.serial))
		.limit(f.pageSize)
		.offset((f.page - 1) * f.pageSize);
	const flags = await headFlags(
		conn,
		shopId,
		rows.map((r) => r.id)
	);
	return { total, rows: rows.map((r) => ({ ...r, ...(flags.get(r.id) ?? { outAsReceived: 0, outFinal: 0, lapsedGauge: 0 }) })) };
}

/**
 * The current reading of every cell: the latest per head × stage × position × measurement
 * (a retest or a correction entered later replaces what was read before).
 */
export function currentReadingsSql(shopId: string, headIds: string[]) {
	const ids = sql.join(
		headIds.map((id) => sql`${id}::uuid`),
		sql`, `
	);
	return sql`
		select distinct on (r.head_id, r.stage, r.cylinder, r.side, r.valve, r.measurement) r.*
		from readings r
		where r.shop_id = ${shopId} and r.head_id in (${ids})
		order by r.head_id, r.stage, r.cylinder, r.side, r.valve, r.measurement, r.measured_at desc, r.id desc`;
}

/** Every calibration of a gauge: the history, plus the instrument's own (latest) record. */
export const CALIBRATIONS_SQL = sql`
	select instrument_id, calibrated_on, interval_days from instrument_calibrations
	union
	select id, calibrated_on, interval_days from instruments`;

export async function headFlags(conn: Conn, shopId: string, headIds: string[]): Promise<Map<string, HeadFlags>> {
	const out = new Map<string, HeadFlags>();
	if (headIds.length === 0) return out;
	const rows = await conn.execute<{ head_id: string; out_ar: number; out_final: number; lapsed: number }>(sql`
		with cur as (${currentReadingsSql(shopId, headIds)}),
		cal as (${CALIBRATIONS_SQL}),
		judged as (
			select cur.head_id, cur.stage, cur.cylinder, cur.side, cur.valve,
				coalesce(cur.value < l.min or cur.value > l.max, false) as out,
				coalesce(cur.measured_at::date > c.calibrated_on + c.interval_days, false) as lapsed
			from cur
			left join lateral (
				select l.min, l.max from limits l
				where l.shop_id = cur.shop_id and l.family_id = cur.family_id and l.measurement = cur.measurement and l.side = cur.side
					and l.stage = cur.stage and l.effective_from <= cur.measured_at::date
				order by l.effective_from desc limit 1
			) l on true
			left join lateral (
				select cal.calibrated_on, cal.interval_days from cal
				where cal.instrument_id = cur.instrument_id and cal.calibrated_on <= cur.measured_at::date
				order by cal.calibrated_on desc limit 1
			) c on true
		)
		select head_id,
			count(distinct (cylinder, side, valve)) filter (where out and stage = 'as_received')::int as out_ar,
			count(distinct (cylinder, side, valve)) filter (where out and stage = 'final')::int as out_final,
			count(*) filter (where lapsed)::int as lapsed
		from judged group by head_id`);
	for (const r of rows) out.set(r.head_id, { outAsReceived: r.out_ar, outFinal: r.out_final, lapsedGauge: r.lapsed });
	return out;
}

export async function headById(conn: Conn, shopId: string, id: string) {
	const [row] = await conn
		.select({ head: heads, family: families })
		.from(heads)
		.innerJoin(families, eq(families.id, heads.familyId))
		.where(and(eq(heads.shopId, shopId), eq(heads.id, id)))
		.limit(1);
	return row ?? null;
}

/** The head row alone. With `lock`, locked until the transaction ends: entries, decisions and
 * release of one head happen one after the other. */
export async function headRow(conn: Conn, shopId: string, id: string, opts: { lock?: boolean } = {}) {
	const q = conn.select().from(heads).where(and(eq(heads.shopId, shopId), eq(heads.id, id))).limit(1).$dynamic();
	const [row] = await (opts.lock ? q.for('update') : q);
	return row ?? null;
}

export async function leakageOf(conn: Conn, shopId: string, headId: string) {
	return conn
		.select()
		.from(cylinderLeakage)
		.where(and(eq(cylinderLeakage.shopId, shopId), eq(cylinderLeakage.headId, headId)))
		.orderBy(asc(cylinderLeakage.cylinder));
}

export async function serialTaken(conn: Conn, shopId: string, serial: string) {
	const [row] = await conn.select({ id: heads.id }).from(heads).where(and(eq(heads.shopId, shopId), eq(heads.serial, serial))).limit(1);
	return Boolean(row);
}

export async function insertHead(conn: Conn, v: typeof heads.$inferInsert) {
	const [row] = await conn.insert(heads).values(v).returning();
	return row;
}

export async function insertLeakage(conn: Conn, rows: (typeof cylinderLeakage.$inferInsert)[]) {
	if (rows.length) await conn.insert(cylinderLeakage).values(rows);
}

export async function setHeadStatus(conn: Conn, shopId: string, id: string, status: (typeof heads.status.enumValues)[number]) {
	await conn.update(heads).set({ status }).where(and(eq(heads.shopId, shopId), eq(heads.id, id)));
}

export async function markReleased(conn: Conn, shopId: string, id: string, v: { releasedOn: string; releasedBy: string; overrideReason: string | null }) {
	await conn
		.update(heads)
		.set({ status: 'released', releasedOn: v.releasedOn, releasedBy: v.releasedBy, releaseOverrideReason: v.overrideReason })
		.where(and(eq(heads.shopId, shopId), eq(heads.id, id)));
}

export async function customersOf(conn: Conn, shopId: string) {
	const rows = await conn
		.selectDistinct({ customer: heads.customer })
		.from(heads)
		.where(and(eq(heads.shopId, shopId), sql`${heads.customer} <> ''`))
		.orderBy(asc(heads.customer))
		.limit(500);
	return rows.map((r) => r.customer);
}

/** The customer's e-mail address from their latest job, to fill in at intake. */
export async function customerEmails(conn: Conn, shopId: string) {
	const rows = await conn.execute<{ customer: string; email: string }>(sql`
		select distinct on (customer) customer, customer_email as email from heads
		where shop_id = ${shopId} and customer <> '' and customer_email is not null
		order by customer, received_on desc`);
	return Object.fromEntries(rows.map((r) => [r.customer, r.email]));
}

export async function shopSettings(conn: Conn, shopId: string): Promise<ShopSettings> {
	const [row] = await conn.select({ settings: shops.settings }).from(shops).where(eq(shops.id, shopId)).limit(1);
	return row?.settings ?? {};
}

export async function updateShopSettings(conn: Conn, shopId: string, patch: Partial<ShopSettings>) {
	const before = await shopSettings(conn, shopId);
	const after = { ...before, ...patch };
	await conn.update(shops).set({ settings: after }).where(eq(shops.id, shopId));
	return { before, after };
}

// ---------------------------------------------------------------------------------------------
// Comebacks

export async function comebacksOfHead(conn: Conn, shopId: string, headId: string) {
	return conn
		.select({
			id: comebacks.id,
			headId: heads.id,
			serial: heads.serial,
			receivedOn: heads.receivedOn,
			mileageKm: heads.mileageKm,
			engineHours: heads.engineHours,
			status: heads.status,
			whatFailed: comebacks.whatFailed,
			positions: comebacks.positions,
			createdAt: comebacks.createdAt
		})
		.from(comebacks)
		.innerJoin(heads, eq(heads.id, comebacks.headId))
		.where(and(eq(comebacks.shopId, shopId), eq(comebacks.originalHeadId, headId)))
		.orderBy(asc(heads.receivedOn), asc(heads.serial));
}

/** For a comeback job: the original and what was recorded as failing. */
export async function comebackDetail(conn: Conn, shopId: string, headId: string) {
	const [row] = await conn
		.select({ whatFailed: comebacks.whatFailed, positions: comebacks.positions, originalId: comebacks.originalHeadId })
		.from(comebacks)
		.where(and(eq(comebacks.shopId, shopId), eq(comebacks.headId, headId)))
		.limit(1);
	return row ?? null;
}

/** The next free comeback serial of an original: S-C1, S-C2 … */
export async function nextComebackSerial(conn: Conn, shopId: string, serial: string) {
	const rows = await conn.select({ serial: heads.serial }).from(heads).where(and(eq(heads.shopId, shopId), ilike(heads.serial, `${serial.replace(/[%_\\]/g, '\\$&')}-C%`)));
	const taken = new Set(rows.map((r) => r.serial.toLowerCase()));
	for (let n = 1; ; n++) {
		const s = `${serial}-C${n}`;
		if (!taken.has(s.toLowerCase())) return s.slice(0, 64);
	}
}

export async function insertComeback(conn: Conn, v: { shopId: string; headId: string; originalHeadId: string; whatFailed: string; positions: PositionRef[]; recordedBy: string }) {
	const [row] = await conn.insert(comebacks).values(v).returning();
	return row;
}

/** Released heads and how many came back, per family: the family's comeback rate. */
export async function comebackCounts(conn: Conn, shopId: string) {
	return conn.execute<{ family_id: string; released: number; came_back: number }>(sql`
		select h.family_id,
			count(*) filter (where h.status = 'released' and h.comeback_of is null)::int as released,
			count(*) filter (where h.status = 'released' and h.comeback_of is null
				and exists (select 1 from heads c where c.comeback_of = h.id))::int as came_back
		from heads h where h.shop_id = ${shopId}
		group by h.family_id`);
}
