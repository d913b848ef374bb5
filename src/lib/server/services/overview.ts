// The overview's figures for one shop, with the slow one (failing positions as received) kept
// per shop while nothing it depends on changed; warmed once per shop after a start (jobs.ts).
import { inShop } from '../db';
import { withShop, withSystem, type Conn } from '../db/scope';
import type { Db } from '../db/client';
import { failingFingerprint, failingPositions, headCounts, latestComebacks, readingsStored, type FailingRow, type OverviewFigures } from '../queries/overview';
import { instrumentsDueWithin } from '../queries/instruments';
import { listBatches } from '../queries/imports';
import { sql } from 'drizzle-orm';
import { wilson } from '../stats/rates';

export type { OverviewFigures };

/** The overview of the actor's shop; the latest imports only for roles that may see imports. */
export function overview(shopId: string, opts: { withImports: boolean }): Promise<OverviewFigures> {
	return inShop(shopId, (tx) => overviewFigures(tx, shopId, opts));
}

export async function overviewFigures(conn: Conn, shopId: string, opts: { withImports: boolean }): Promise<OverviewFigures> {
	const heads = await headCounts(conn, shopId);
	const stored = await readingsStored(conn, shopId);
	// A valve position fails as received when any of its as-received readings is outside the
	// limits in effect on the day it was measured.
	const failing = await cachedFailingPositions(conn, shopId);
	const due = await instrumentsDueWithin(conn, shopId, 30);
	const comebacks = await latestComebacks(conn, shopId, 5);
	const imports = opts.withImports ? await listBatches(conn, shopId, { limit: 5 }) : null;
	return {
		headsReceivedThisMonth: heads.received,
		headsReleasedThisMonth: heads.released,
		headsInWork: heads.in_work,
		readingsStored: stored,
		failingAsReceived: failing.map((r) => {
			const w = wilson(r.failing, r.positions);
			return { ...r, share: w.rate, ci95: { low: w.low, high: w.high } };
		}),
		instrumentsDue: due.map((i) => ({ id: i.id, name: i.name, serial: i.serial, dueOn: i.dueOn, daysLeft: i.daysLeft })),
		latestComebacks: comebacks,
		latestImports: imports?.map((b) => ({ id: b.id, fileName: b.fileName, status: b.status, readings: b.readings, rejected: b.rejected, createdAt: new Date(b.createdAt).toISOString() })) ?? null
	};
}

/**
 * The last answer per shop, with a fingerprint of everything it depends on (failingFingerprint).
 * Kept at most 10 minutes whatever the fingerprint says.
 */
const failingCache = new Map<string, { fingerprint: string; at: number; rows: FailingRow[] }>();
const FAILING_TTL_MS = 10 * 60_000;

/** Valve positions with any as-received reading outside the limits of its day, per side; the
 * kept answer while its fingerprint holds. */
export async function cachedFailingPositions(conn: Conn, shopId: string): Promise<FailingRow[]> {
	const fingerprint = await failingFingerprint(conn, shopId);
	const hit = failingCache.get(shopId);
	if (hit && hit.fingerprint === fingerprint && Date.now() - hit.at < FAILING_TTL_MS) return hit.rows;
	const rows = await failingPositions(conn, shopId);
	failingCache.set(shopId, { fingerprint, at: Date.now(), rows });
	return rows;
}

/**
 * Works out every shop's failing positions once, in the background, when the server starts, so
 * the first overview after a start does not wait for it. Errors are logged, never thrown.
 */
export async function warmOverviews(db: Db): Promise<void> {
	try {
		const shopIds = await withSystem(db, (tx) => tx.execute<{ id: string }>(sql`select id from shops`));
		for (const { id } of shopIds) await withShop(db, id, (tx) => cachedFailingPositions(tx, id));
	} catch (e) {
		console.error('[overview] warming the figures failed', e);
	}
}
