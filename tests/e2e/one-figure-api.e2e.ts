// One figure per question: the same selection asked through every page's API calls gives the
// same count and share, for every family × side × measurement × stage of the demo shop.
//
//   the failure share (rates page, the family page's side card, and since this change the family
//   page's histograms, the overview's Most worn table and the families side by side, which all
//   read /stats/rates): valve positions with a reading outside the limit version in force on the
//   day it was measured;
//   /stats/distribution and /stats/compare `outside`: READINGS outside the limits of their day,
//   and `outsideAsOf` the same readings against the limits in force today (a separate question);
//   /readings: the export, whose rows are counted and judged here by hand against every limit
//   version (read from the database), as an independent recomputation of both.
//
// A position has one reading of a selection for every measurement but the seal tests, which a
// machinist repeats after reworking a valve: there, and only there, positions and readings
// differ; the test asserts that too.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { MEASUREMENTS, SIDES, STAGES, type Measurement, type Side, type Stage } from '../../src/lib/measurements';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { withSystem } from '../../src/lib/server/db/scope';
import { raw, testDb } from '../helpers/db';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const engineer = demoSignIns().find((s) => s.shop === 'brackenford' && s.role === 'engineer')!;
afterAll(() => sql.end());

async function api<T = any>(path: string): Promise<T> {
	const res = await fetch(`${baseURL}${path}`, { headers: { authorization: `Bearer ${engineer.token}`, accept: 'application/json' } });
	expect(res.status, path).toBe(200);
	return (await res.json()) as T;
}

/** Runs `work` over `items`, `width` at a time (the shared machine has two cores). */
async function inTurns<T>(items: T[], width: number, work: (item: T) => Promise<void>) {
	let next = 0;
	await Promise.all(Array.from({ length: width }, async () => {
		while (next < items.length) await work(items[next++]);
	}));
}

type Reading = { headId: string; family: string; stage: Stage; side: Side; cylinder: number; valve: number; measurement: Measurement; value: number; measuredAt: string };
type Version = { family: string; measurement: Measurement; side: Side; stage: Stage; min: number | null; max: number | null; from: string };
type Tally = { readings: number; judged: number; outside: number; outsideToday: number; positions: Map<string, boolean> };

const comboKey = (family: string, m: Measurement, side: Side, stage: Stage) => `${family}|${m}|${side}|${stage}`;
const tallies = new Map<string, Tally>();
/** As-received positions of every measurement per side, as the overview counts them. */
const asReceived: Record<Side, Map<string, boolean>> = { intake: new Map(), exhaust: new Map() };
let families: string[] = [];
const today = new Date().toISOString().slice(0, 10);

beforeAll(async () => {
	families = (await api<{ families: { code: string }[] }>('/api/v1/families')).families.map((f) => f.code).sort();
	const versions = await withSystem(db, (t) =>
		t.execute<Version>(raw`
			select f.code as family, l.measurement, l.side, l.stage, l.min, l.max, l.effective_from::text as "from"
			from limits l join families f on f.id = l.family_id join shops s on s.id = l.shop_id
			where s.slug = ${engineer.shop} order by l.effective_from`)
	);
	const byCombo = new Map<string, Version[]>();
	for (const v of versions) byCombo.set(comboKey(v.family, v.measurement, v.side, v.stage), [...(byCombo.get(comboKey(v.family, v.measurement, v.side, v.stage)) ?? []), v]);
	const beyond = (v: Version, x: number) => (v.min !== null && x < v.min) || (v.max !== null && x > v.max);

	// Every reading of the shop, from the export.
	const rows = await api<Reading[]>('/api/v1/readings?format=json');
	for (const r of rows) {
		const key = comboKey(r.family, r.measurement, r.side, r.stage);
		let t = tallies.get(key);
		if (!t) tallies.set(key, (t = { readings: 0, judged: 0, outside: 0, outsideToday: 0, positions: new Map() }));
		t.readings++;
		const list = byCombo.get(key) ?? [];
		const day = r.measuredAt.slice(0, 10); // UTC day
		const ofDay = list.filter((v) => v.from <= day).at(-1);
		const now = list.filter((v) => v.from <= today).at(-1);
		if (now && beyond(now, r.value)) t.outsideToday++;
		if (!ofDay) continue;
		t.judged++;
		const out = beyond(ofDay, r.value);
		if (out) t.outside++;
		const pos = `${r.headId}|${r.cylinder}|${r.valve}`;
		t.positions.set(pos, (t.positions.get(pos) ?? false) || out);
		if (r.stage === 'as_received') {
			const p = `${r.headId}|${r.cylinder}|${r.valve}`;
			asReceived[r.side].set(p, (asReceived[r.side].get(p) ?? false) || out);
		}
	}
}, 180_000);

const failing = (m: Map<string, boolean>) => [...m.values()].filter(Boolean).length;

describe('one figure per question, through every page’s API calls', () => {
	it('FIR-6D exhaust clearance as received: 122 of 312 positions (39.1 %) outside the limits of their day; 159 of 312 readings against today’s', async () => {
		const q = 'family=FIR-6D&side=exhaust&stage=as_received';
		const rates = await api(`/api/v1/stats/rates?check=clearance&${q}`);
		expect(rates.overall).toMatchObject({ failures: 122, n: 312 });
		expect(rates.overall.rate).toBeCloseTo(0.391, 3);
		const d = await api(`/api/v1/stats/distribution?measurement=clearance&${q}`);
		expect(d.n).toBe(312);
		expect(d.outside).toEqual({ below: 0, above: 122, judged: 312, share: 122 / 312 });
		expect(d.outsideAsOf).toEqual({ below: 0, above: 159, judged: 312, share: 159 / 312 });
		const all = await api('/api/v1/stats/rates?check=clearance&side=exhaust&stage=as_received');
		expect(all.families.find((f: { family: { code: string } }) => f.family.code === 'FIR-6D')).toMatchObject({ failures: 122, n: 312 });
		const c = await api('/api/v1/stats/compare?measurement=clearance&side=exhaust&stage=as_received');
		expect(c.families.find((f: { family: { code: string } }) => f.family.code === 'FIR-6D').outside).toEqual(d.outside);
		const page = await api(`/api/v1/readings?measurement=clearance&${q}&page=1&pageSize=1`);
		expect(page.total).toBe(312);
	});

	it('every family × side × measurement × stage: rates, distribution, compare and the export agree', async () => {
		const differ: string[] = [];
		let checked = 0;
		const series = MEASUREMENTS.flatMap((m) => SIDES.flatMap((side) => STAGES.map((stage) => ({ m, side, stage }))));
		await inTurns(series, 3, async ({ m, side, stage }) => {
			const sel = `side=${side}&stage=${stage}`;
			// The overview's Most worn and the families side by side: every family at once.
			const [c, all] = await Promise.all([api(`/api/v1/stats/compare?measurement=${m}&${sel}`), api(`/api/v1/stats/rates?check=${m}&${sel}`)]);
			for (const family of families) {
				const key = comboKey(family, m, side, stage);
				const t = tallies.get(key) ?? { readings: 0, judged: 0, outside: 0, outsideToday: 0, positions: new Map() };
				const fq = `family=${family}&${sel}`;
				// The family page (histogram and side card) and the rates page: one family.
				const [d, r, page] = await Promise.all([
					api(`/api/v1/stats/distribution?measurement=${m}&${fq}`),
					api(`/api/v1/stats/rates?check=${m}&${fq}`),
					api(`/api/v1/readings?measurement=${m}&${fq}&page=1&pageSize=1`)
				]);
				const what = `${key}`;
				// Readings: the export's count and the distribution's.
				expect(page.total, what).toBe(t.readings);
				expect(d.n, what).toBe(t.readings);
				expect(d.outside.judged, what).toBe(t.judged);
				expect(d.outside.below + d.outside.above, what).toBe(t.outside);
				expect(d.outsideAsOf.below + d.outsideAsOf.above, what).toBe(t.outsideToday);
				const cf = c.families.find((f: { family: { code: string } }) => f.family.code === family);
				if (t.readings) {
					expect(cf.n, what).toBe(d.n);
					expect(cf.outside, what).toEqual(d.outside);
					expect(cf.outsideAsOf, what).toEqual(d.outsideAsOf);
				} else expect(cf, what).toBeUndefined();
				// Positions: the rates answer, one family and every family, against the export.
				expect(r.overall, what).toMatchObject({ n: t.positions.size, failures: failing(t.positions) });
				const rf = all.families.find((f: { family: { code: string } }) => f.family.code === family);
				if (t.positions.size) expect(rf, what).toMatchObject({ n: r.overall.n, failures: r.overall.failures, rate: r.overall.rate });
				else expect(rf, what).toBeUndefined();
				// The same count and share for readings and positions wherever a position has one
				// reading of the selection.
				if (t.judged === t.positions.size) {
					expect([d.outside.judged, d.outside.below + d.outside.above], what).toEqual([r.overall.n, r.overall.failures]);
					expect(d.outside.share, what).toBe(r.overall.rate);
				} else differ.push(`${m}|${stage}`);
				checked++;
			}
		});
		expect(checked).toBe(MEASUREMENTS.length * 4 * families.length);
		// Only repeated seal tests (final vacuum and fluid holds) count more readings than positions.
		expect([...new Set(differ)].sort()).toEqual(['fluid_hold|final', 'vacuum_hold|final']);
	}, 600_000);

	it('the overview: as-received positions outside the limits of their day, per side, as the export gives them', async () => {
		const o = await api('/api/v1/overview');
		for (const side of SIDES) {
			const row = o.failingAsReceived.find((x: { side: Side }) => x.side === side);
			expect(row, side).toMatchObject({ positions: asReceived[side].size, failing: failing(asReceived[side]) });
		}
	});
});
