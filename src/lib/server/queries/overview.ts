import { sql } from 'drizzle-orm';
import type { Conn } from '../db/scope';

/** Limits with the day each version stops applying, so a reading finds the version of its day. */
export const LIMIT_VERSIONS = sql`
	select l.*, lead(l.effective_from) over (
		partition by l.family_id, l.measurement, l.side, l.stage order by l.effective_from
	) as effective_to
	from limits l`;

export interface OverviewFigures {
	headsReceivedThisMonth: number;
	headsReleasedThisMonth: number;
	headsInWork: number;
	readingsStored: number;
	failingAsReceived: { side: 'intake' | 'exhaust'; positions: number; failing: number; share: number | null }[];
}

export async function overviewFigures(conn: Conn, shopId: string): Promise<OverviewFigures> {
	const [heads] = await conn.execute<{ received: number; released: number; in_work: number }>(sql`
		select
			count(*) filter (where received_on >= date_trunc('month', current_date))::int as received,
			count(*) filter (where released_on >= date_trunc('month', current_date))::int as released,
			count(*) filter (where status <> 'released')::int as in_work
		from heads where shop_id = ${shopId}`);
	const [stored] = await conn.execute<{ n: number }>(sql`select count(*)::int as n from readings where shop_id = ${shopId}`);
	// A valve position fails as received when any of its as-received readings is outside the
	// limits in effect on the day it was measured.
	const failing = await conn.execute<{ side: 'intake' | 'exhaust'; positions: number; failing: number }>(sql`
		with lv as (${LIMIT_VERSIONS}),
		judged as (
			select r.head_id, r.cylinder, r.side, r.valve,
				bool_or(lv.id is not null and (r.value < coalesce(lv.min, '-Infinity') or r.value > coalesce(lv.max, 'Infinity'))) as out
			from readings r
			left join lv on lv.family_id = r.family_id and lv.measurement = r.measurement and lv.side = r.side
				and lv.stage = r.stage and lv.effective_from <= r.measured_at::date
				and (lv.effective_to is null or lv.effective_to > r.measured_at::date)
			where r.shop_id = ${shopId} and r.stage = 'as_received'
			group by 1, 2, 3, 4
		)
		select side, count(*)::int as positions, count(*) filter (where out)::int as failing
		from judged group by side order by side`);
	return {
		headsReceivedThisMonth: heads.received,
		headsReleasedThisMonth: heads.released,
		headsInWork: heads.in_work,
		readingsStored: stored.n,
		failingAsReceived: failing.map((r) => ({ ...r, share: r.positions ? r.failing / r.positions : null }))
	};
}
