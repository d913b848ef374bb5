// The head workflow against the real database: intake, the grid's saves, limits of the day,
// lapsed gauges, decisions, the release gate with an owner's override, comebacks, tenancy.
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { auditLog, boreReadings, cylinderLeakage, heads, instruments, limits, readings } from '../../src/lib/server/db/schema';
import { posKey } from '../../src/lib/inspection';
import { saveEntries, EntryRefused, type EntryInput, type Who } from '../../src/lib/server/services/entry';
import { loadHeadView, releaseBlockers, today } from '../../src/lib/server/services/head-view';
import { intakeHead, recordComeback, recordDecision, releaseHead, type IntakeData } from '../../src/lib/server/services/heads';
import { buildReport } from '../../src/lib/server/services/report';
import { comebackCounts, headFlags, listHeads } from '../../src/lib/server/queries/heads';
import { instrumentsDueWithin, insertInstrument, recordCalibration } from '../../src/lib/server/queries/instruments';
import { saveLimitVersion } from '../../src/lib/server/queries/families';
import { makeShop, testDb } from '../helpers/db';
import { shopWithPeople } from '../helpers/people';

const { db, sql } = testDb();
let shopId: string;
let familyId: string;
let who: Who;
let owner: Who;

const intake = (over: Partial<IntakeData> = {}): IntakeData => ({
	serial: `T-${Math.random().toString(36).slice(2, 8)}`,
	familyId,
	customer: 'Invented Test Garage',
	customerEmail: 'service@invented-test-garage.example',
	receivedOn: today(),
	usageUnit: 'km',
	usage: 120_000,
	complaint: 'Loss of power',
	leakMode: 'pct',
	pressureUnit: 'psi',
	leaks: [],
	...over
});

async function newHead(over: Partial<IntakeData> = {}) {
	const r = await withShop(db, shopId, (tx) => intakeHead(tx, shopId, who, intake(over)));
	if (!r.ok) throw new Error(r.message + JSON.stringify(r.errors));
	return r.head;
}

const save = (headId: string, stage: 'as_received' | 'final', input: Partial<EntryInput> & { cells: EntryInput['cells'] }) =>
	withShop(db, shopId, (tx) => saveEntries(tx, shopId, who, headId, stage, { units: {}, instruments: {}, ...input }));

beforeAll(async () => {
	const s = await shopWithPeople(db, 'heads');
	shopId = s.shop.id;
	familyId = s.family.id;
	who = { userId: s.people.machinist.userId, label: s.people.machinist.email, name: 'Test Machinist' };
	owner = { userId: s.people.owner.userId, label: s.people.owner.email, name: 'Test Owner' };
	// Limits of the test family (4 cylinders, 2 intake + 2 exhaust valves, 6 mm stems), taking
	// effect long ago. Typical trade figures (common practice), not a maker's data.
	await withShop(db, shopId, async (tx) => {
		const base = { shopId, familyId, effectiveFrom: '2020-01-01', note: 'test', createdBy: owner.userId };
		for (const side of ['intake', 'exhaust'] as const) {
			await saveLimitVersion(tx, { ...base, measurement: 'clearance', side, stage: 'as_received', min: null, max: side === 'intake' ? 0.1 : 0.12 });
			await saveLimitVersion(tx, { ...base, measurement: 'clearance', side, stage: 'final', min: 0.025, max: 0.08 });
			await saveLimitVersion(tx, { ...base, measurement: 'seat_runout', side, stage: 'as_received', min: null, max: 0.05 });
			await saveLimitVersion(tx, { ...base, measurement: 'vacuum_hold', side, stage: 'final', min: 90, max: null });
		}
	});
});
afterAll(() => sql.end());

describe('intake', () => {
	it('stores the head and the leak-down worked out from gauge pressures', async () => {
		// 100 psi in, 88 psi held: (100 − 88) / 100 × 100 = 12 % (differential gauge, DOMAIN.md).
		const head = await newHead({
			usageUnit: 'mi',
			usage: 100_000,
			leakMode: 'pressure',
			pressureUnit: 'psi',
			leaks: [
				{ cylinder: 1, pct: null, pin: 100, held: 88, path: 'exhaust' },
				{ cylinder: 2, pct: null, pin: null, held: null, path: 'none' }
			]
		});
		expect(head.mileageKm).toBe(160_934); // 100 000 mi × 1.609344 km/mi, to the km
		const rows = await withShop(db, shopId, (tx) => tx.select().from(cylinderLeakage).where(eq(cylinderLeakage.headId, head.id)));
		expect(rows).toHaveLength(1);
		expect(rows[0]).toMatchObject({ cylinder: 1, leakagePct: 12, leakPath: 'exhaust' });
		expect(rows[0].pressureInKpa).toBeCloseTo(689.4757, 3);
		expect(rows[0].pressureHeldKpa).toBeCloseTo(606.7386, 3);
	});

	it('refuses a held pressure above the pressure in, a taken serial, a future date, and saves nothing', async () => {
		const taken = await newHead();
		const r = await withShop(db, shopId, (tx) =>
			intakeHead(tx, shopId, who, intake({ serial: taken.serial, receivedOn: '2999-01-01', leakMode: 'pressure', leaks: [{ cylinder: 3, pct: null, pin: 80, held: 90, path: 'intake' }] }))
		);
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(Object.keys(r.errors).sort()).toEqual(['leak.3', 'receivedOn', 'serial']);
		const n = await withShop(db, shopId, (tx) => tx.select().from(heads).where(eq(heads.serial, taken.serial)));
		expect(n).toHaveLength(1);
	});
});

describe('the inspection grid', () => {
	it('works guide bore, ovality, taper and clearance out of bore readings typed in inches', async () => {
		const head = await newHead();
		// The hand-worked example of src/lib/inspection.spec.ts, on cylinder 2 exhaust valve 1:
		// bores along/across 0.3140/0.3132 (top), 0.3128/0.3127 (middle), 0.3136/0.3130 (bottom) in,
		// stem 0.3100 in. Largest 7.9756 mm; ovality 0.02032 mm; taper 0.03048 mm; clearance 0.1016 mm.
		const pos = '2-exhaust-1';
		const cells = [
			['bore:along:top', '0.3140'],
			['bore:across:top', '0.3132'],
			['bore:along:middle', '0.3128'],
			['bore:across:middle', '0.3127'],
			['bore:along:bottom', '0.3136'],
			['bore:across:bottom', '0.3130'],
			['stem_diameter', '0.3100']
		].map(([field, text]) => ({ pos, field, text }));
		const r = await save(head.id, 'as_received', { cells, units: { bore: 'in', stem_diameter: 'in' } });
		expect(r).toMatchObject({ ok: true, changed: 7, status: 'inspected' });
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		const p = view.stages.as_received.find((s) => s.key === pos)!;
		expect(p.cells.stem_diameter?.value).toBe(7.874);
		expect(p.cells.guide_bore?.value).toBe(7.9756);
		expect(p.cells.clearance?.value).toBe(0.1016);
		expect(p.geometry).toMatchObject({ largest: 7.9756, ovality: 0.02032, ovalityAt: 'top', taper: 0.03048, taperDirection: 'along' });
		// Within the exhaust service limit of 0.120 mm: no limit flag on the clearance.
		expect(p.cells.clearance?.flags).toEqual([]);
		expect(view.suggestions.get(pos)?.kind).toBe('knurl_guide');

		// A correction to one bore cell moves the clearance with it, and is audited.
		await save(head.id, 'as_received', { cells: [{ pos, field: 'bore:along:top', text: '0.3150' }], units: { bore: 'in' } });
		const after = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!.stages.as_received.find((s) => s.key === pos)!;
		expect(after.cells.clearance?.value).toBe(0.127); // 0.3150 in = 8.001 mm; 8.001 − 7.874
		expect(after.cells.clearance?.flags[0].text).toMatch(/above the maximum 0\.120 mm/);
		const trail = await withShop(db, shopId, (tx) => tx.select().from(auditLog).where(and(eq(auditLog.shopId, shopId), eq(auditLog.entity, 'bore_reading'), eq(auditLog.action, 'update'))));
		expect(trail.at(-1)?.before).toEqual({ valueMm: 7.9756 });
	});

	it('saves nothing when one value of a save is bad, and says which', async () => {
		const head = await newHead();
		const r = await save(head.id, 'as_received', {
			cells: [
				{ pos: '1-intake-1', field: 'seat_runout', text: '0.02' },
				{ pos: '1-intake-1', field: 'seat_width', text: '1,2,3' },
				{ pos: '9-intake-1', field: 'margin', text: '1.2' },
				{ pos: '1-intake-1', field: 'roughness_ra', text: '0.2' }
			]
		});
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(r.code).toBe(400);
		expect(Object.keys(r.errors).sort()).toEqual(['1-intake-1|roughness_ra', '1-intake-1|seat_width', '9-intake-1|margin']);
		const stored = await withShop(db, shopId, (tx) => tx.select().from(readings).where(eq(readings.headId, head.id)));
		expect(stored).toEqual([]);
	});

	it('refuses a bore smaller than the stem and rolls the whole save back', async () => {
		const head = await newHead();
		const attempt = save(head.id, 'as_received', {
			cells: [
				{ pos: '1-intake-1', field: 'stem_diameter', text: '6.000' },
				{ pos: '1-intake-1', field: 'bore:along:middle', text: '5.990' }
			]
		});
		await expect(attempt).rejects.toBeInstanceOf(EntryRefused);
		const stored = await withShop(db, shopId, (tx) => tx.select().from(boreReadings).where(eq(boreReadings.headId, head.id)));
		expect(stored).toEqual([]);
	});
});

describe('limits of the day', () => {
	it('judges an old reading by the old limit and a new one by the new', async () => {
		const head = await newHead({ receivedOn: '2025-03-01' });
		await withShop(db, shopId, async (tx) => {
			// Intake seat runout tightens from 0.050 to 0.040 mm on 2025-06-01.
			await saveLimitVersion(tx, { shopId, familyId, measurement: 'seat_runout', side: 'intake', stage: 'as_received', min: null, max: 0.04, effectiveFrom: '2025-06-01', note: 'tightened', createdBy: owner.userId });
			const r = { shopId, headId: head.id, familyId, stage: 'as_received' as const, side: 'intake' as const, measurement: 'seat_runout' as const, value: 0.045, measuredBy: 'Test' };
			await tx.insert(readings).values([
				{ ...r, cylinder: 1, valve: 1, measuredAt: new Date('2025-03-03T10:00:00Z') },
				{ ...r, cylinder: 2, valve: 1, measuredAt: new Date('2025-06-02T10:00:00Z') }
			]);
		});
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		const old = view.stages.as_received.find((p) => p.key === '1-intake-1')!.cells.seat_runout!;
		const recent = view.stages.as_received.find((p) => p.key === '2-intake-1')!.cells.seat_runout!;
		expect(old.flags).toEqual([]);
		expect(recent.flags.map((f) => f.text)).toEqual(['Seat runout (TIR) 0.045 mm is above the maximum 0.040 mm (limits from 2025-06-01).']);
		// The list's flag count agrees: one intake position out as received.
		const flags = await withShop(db, shopId, (tx) => headFlags(tx, shopId, [head.id]));
		expect(flags.get(head.id)?.outAsReceived).toBe(1);
		// And the suggestion for the recent one recuts the seat; the old one is lapped.
		expect(view.suggestions.get('2-intake-1')?.kind).toBe('recut_seat');
		expect(view.suggestions.get('1-intake-1')?.kind).toBe('lap');
	});
});

describe('gauges', () => {
	it('flags readings taken after the gauge’s calibration ran out, and lists gauges coming due', async () => {
		const { gauge, fresh } = await withShop(db, shopId, async (tx) => {
			// Calibrated 400 days ago for 365 days: it ran out 35 days ago.
			const calibratedOn = new Date(Date.now() - 400 * 86_400_000).toISOString().slice(0, 10);
			const gauge = await insertInstrument(tx, { shopId, name: 'Test dial indicator', kind: 'dial_indicator', serial: `TD-${Math.random()}`, resolutionMm: 0.001, calibratedOn, intervalDays: 365 }, owner.userId);
			const fresh = await insertInstrument(tx, { shopId, name: 'Test micrometer', kind: 'micrometer', serial: `TM-${Math.random()}`, resolutionMm: 0.001, calibratedOn: today(), intervalDays: 365 }, owner.userId);
			return { gauge, fresh };
		});
		const head = await newHead();
		const r = await save(head.id, 'as_received', {
			cells: [
				{ pos: '1-exhaust-1', field: 'seat_runout', text: '0.020' },
				{ pos: '1-exhaust-1', field: 'stem_diameter', text: '5.960' }
			],
			instruments: { seat_runout: gauge.id, stem_diameter: fresh.id }
		});
		expect(r.ok).toBe(true);
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		const p = view.stages.as_received.find((x) => x.key === '1-exhaust-1')!;
		expect(p.cells.seat_runout?.flags).toEqual([
			{ kind: 'gauge', level: 'bad', text: expect.stringMatching(/^Taken with Test dial indicator \(TD-.*\), whose calibration ran out on \d{4}-\d{2}-\d{2}\.$/) }
		]);
		expect(p.cells.stem_diameter?.flags).toEqual([]);
		const flags = await withShop(db, shopId, (tx) => headFlags(tx, shopId, [head.id]));
		expect(flags.get(head.id)?.lapsedGauge).toBe(1);

		const due = await withShop(db, shopId, (tx) => instrumentsDueWithin(tx, shopId, 30));
		expect(due.map((d) => d.id)).toContain(gauge.id);
		expect(due.map((d) => d.id)).not.toContain(fresh.id);
		expect(due.find((d) => d.id === gauge.id)?.daysLeft).toBe(-35);

		// A calibration recorded today covers readings from today on; the old reading keeps its flag
		// only if it was taken while lapsed — it was taken today, after the new calibration: clear.
		await withShop(db, shopId, (tx) => recordCalibration(tx, { shopId, instrumentId: gauge.id, calibratedOn: today(), intervalDays: 365, note: 'sent out', recordedBy: owner.userId }));
		const again = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		expect(again.stages.as_received.find((x) => x.key === '1-exhaust-1')!.cells.seat_runout?.flags).toEqual([]);
		const dueAfter = await withShop(db, shopId, (tx) => instrumentsDueWithin(tx, shopId, 30));
		expect(dueAfter.map((d) => d.id)).not.toContain(gauge.id);
		const [g] = await withShop(db, shopId, (tx) => tx.select().from(instruments).where(eq(instruments.id, gauge.id)));
		expect(g.calibratedOn).toBe(today());
	});
});

/** Final readings that pass for every position of the 4-cylinder test family. */
function passingFinal(vacuum = '95') {
	const cells: EntryInput['cells'] = [];
	for (let c = 1; c <= 4; c++) {
		for (const side of ['intake', 'exhaust'] as const) {
			for (let v = 1; v <= 2; v++) {
				const pos = `${c}-${side}-${v}`;
				cells.push({ pos, field: 'vacuum_hold', text: vacuum }, { pos, field: 'fluid_hold', text: '120' });
			}
		}
	}
	return cells;
}

async function decideAll(headId: string) {
	for (let c = 1; c <= 4; c++) {
		for (const side of ['intake', 'exhaust'] as const) {
			for (let v = 1; v <= 2; v++) {
				const r = await withShop(db, shopId, (tx) => recordDecision(tx, shopId, who, headId, { pos: `${c}-${side}-${v}`, kind: 'lap', note: '', acknowledge: false }));
				expect(r.ok).toBe(true);
			}
		}
	}
}

describe('release', () => {
	it('is blocked by a failing seal test, passes once the valve is re-lapped and retested', async () => {
		const head = await newHead();
		await save(head.id, 'as_received', { cells: [{ pos: '1-intake-1', field: 'seat_runout', text: '0.02' }] });
		await decideAll(head.id);
		expect((await withShop(db, shopId, (tx) => tx.select().from(heads).where(eq(heads.id, head.id))))[0].status).toBe('in_rework');
		const cells = passingFinal();
		// Cylinder 3 exhaust 2: the vacuum test typed as pressures, 20 inHg applied, 16.5 held → 82.5 %.
		const i = cells.findIndex((c) => c.pos === '3-exhaust-2' && c.field === 'vacuum_hold');
		cells.splice(i, 1);
		expect((await save(head.id, 'final', { cells })).ok).toBe(true);
		const r1 = await save(head.id, 'final', { cells: [{ pos: '3-exhaust-2', field: 'vacuum_hold', text: '16.5' }], units: { vacuum_hold: 'inHg' }, appliedVacuum: '20' });
		expect(r1).toMatchObject({ ok: true, status: 'final_check' });

		const blocked = await withShop(db, shopId, (tx) => releaseHead(tx, shopId, who, head.id, { override: false, reason: '', isOwner: false }));
		expect(blocked.ok).toBe(false);
		if (blocked.ok || !('blockers' in blocked)) throw new Error('expected blockers');
		expect(blocked.code).toBe(409);
		expect(blocked.blockers!.map((b) => posKey(b.pos))).toEqual(['3-exhaust-2']);
		expect(blocked.blockers![0].reasons.join(' ')).toMatch(/Vacuum hold 82\.5 % is under the pass mark of 90 %/);
		// A machinist cannot override; nothing changed.
		const refused = await withShop(db, shopId, (tx) => releaseHead(tx, shopId, who, head.id, { override: true, reason: 'Customer needs it today', isOwner: false }));
		expect(refused).toMatchObject({ ok: false, code: 403 });
		expect((await withShop(db, shopId, (tx) => tx.select().from(heads).where(eq(heads.id, head.id))))[0].status).toBe('final_check');

		// Re-lapped and retested: 19.5 of 20 inHg = 97.5 %.
		await save(head.id, 'final', { cells: [{ pos: '3-exhaust-2', field: 'vacuum_hold', text: '19.5' }], units: { vacuum_hold: 'inHg' }, appliedVacuum: '20' });
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		expect(view.stages.final.find((p) => p.key === '3-exhaust-2')!.cells.vacuum_hold?.value).toBe(97.5);
		expect(releaseBlockers(view)).toEqual([]);
		const ok = await withShop(db, shopId, (tx) => releaseHead(tx, shopId, who, head.id, { override: false, reason: '', isOwner: false }));
		expect(ok).toMatchObject({ ok: true, releasedOn: today(), overridden: false });
		// Released: the readings are closed.
		const closed = await save(head.id, 'final', { cells: [{ pos: '1-intake-1', field: 'fluid_hold', text: '100' }] });
		expect(closed).toMatchObject({ ok: false, code: 409 });
	});

	it('lets an owner release over a failing check with a written reason, audited as an override', async () => {
		const head = await newHead();
		await decideAll(head.id);
		await save(head.id, 'final', { cells: passingFinal('85') });
		const short = await withShop(db, shopId, (tx) => releaseHead(tx, shopId, owner, head.id, { override: true, reason: 'ok', isOwner: true }));
		expect(short).toMatchObject({ ok: false, code: 400 });
		const r = await withShop(db, shopId, (tx) =>
			releaseHead(tx, shopId, owner, head.id, { override: true, reason: 'Customer takes it for a test run only; will return for new valves.', isOwner: true })
		);
		expect(r).toMatchObject({ ok: true, overridden: true });
		const [h] = await withShop(db, shopId, (tx) => tx.select().from(heads).where(eq(heads.id, head.id)));
		expect(h.releaseOverrideReason).toMatch(/test run only/);
		const trail = await withShop(db, shopId, (tx) => tx.select().from(auditLog).where(and(eq(auditLog.entityId, head.id), eq(auditLog.action, 'override'))));
		expect(trail).toHaveLength(1);
		expect((trail[0].before as { blockers: unknown[] }).blockers).toHaveLength(16);
		const report = buildReport((await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!, 'Test shop');
		expect(report.overrideReason).toMatch(/test run only/);
		expect(report.positions[0].seal.passed).toBe(false);
	});
});

describe('decisions', () => {
	it('warns against a seat cut on a guide out of limits until acknowledged', async () => {
		const head = await newHead();
		await save(head.id, 'as_received', {
			cells: [
				{ pos: '1-intake-1', field: 'stem_diameter', text: '5.970' },
				{ pos: '1-intake-1', field: 'bore:along:middle', text: '6.100' },
				{ pos: '1-intake-1', field: 'seat_runout', text: '0.080' }
			]
		});
		const r = await withShop(db, shopId, (tx) => recordDecision(tx, shopId, who, head.id, { pos: '1-intake-1', kind: 'recut_seat', note: '', acknowledge: false }));
		expect(r).toMatchObject({ ok: false, code: 409 });
		const ok = await withShop(db, shopId, (tx) => recordDecision(tx, shopId, who, head.id, { pos: '1-intake-1', kind: 'recut_seat', note: 'Customer declined guides', acknowledge: true }));
		expect(ok.ok).toBe(true);
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		const d = view.decisions.get('1-intake-1')!;
		expect(d).toMatchObject({ suggested: 'replace_guide', kind: 'recut_seat' });
		expect(d.rule).toMatch(/^Clearance 0\.130 mm is over the service limit 0\.100 mm: replace the guide\./);
		expect(d.note).toMatch(/Customer declined guides Seat cut recorded with the guide out of limits \(acknowledged\)\./);
	});
});

describe('comebacks', () => {
	it('records a comeback as a new job linked to the original, counted for the family', async () => {
		const head = await newHead({ usage: 150_000 });
		await decideAll(head.id);
		await save(head.id, 'final', { cells: passingFinal() });
		await withShop(db, shopId, (tx) => releaseHead(tx, shopId, who, head.id, { override: false, reason: '', isOwner: false }));
		const early = await withShop(db, shopId, (tx) =>
			recordComeback(tx, shopId, who, head.id, { returnedOn: '2000-01-01', usageUnit: 'km', usage: 100, whatFailed: 'Oil use', positions: ['1-exhaust-1', '8-exhaust-1'] })
		);
		expect(early).toMatchObject({ ok: false, code: 400 });
		expect(Object.keys((early as { errors: object }).errors).sort()).toEqual(['positions', 'returnedOn', 'usage']);
		const r = await withShop(db, shopId, (tx) =>
			recordComeback(tx, shopId, who, head.id, { returnedOn: today(), usageUnit: 'mi', usage: 100_000, whatFailed: 'Misfire, cylinder 1 exhaust valve not sealing', positions: ['1-exhaust-1'] })
		);
		if (!r.ok) throw new Error(r.message);
		expect(r.head).toMatchObject({ serial: `${head.serial}-C1`, comebackOf: head.id, mileageKm: 160_934, status: 'received' });
		const view = (await withShop(db, shopId, (tx) => loadHeadView(tx, shopId, head.id)))!;
		expect(view.returns).toHaveLength(1);
		expect(view.returns[0]).toMatchObject({ serial: `${head.serial}-C1`, whatFailed: 'Misfire, cylinder 1 exhaust valve not sealing', positions: [{ cylinder: 1, side: 'exhaust', valve: 1 }] });
		const counts = await withShop(db, shopId, (tx) => comebackCounts(tx, shopId));
		const mine = counts.find((c) => c.family_id === familyId)!;
		expect(mine.came_back).toBeGreaterThanOrEqual(1);
		expect(mine.released).toBeGreaterThanOrEqual(mine.came_back);
		const list = await withShop(db, shopId, (tx) => listHeads(tx, shopId, { q: head.serial, sort: 'serial', dir: 'asc', page: 1, pageSize: 50 }));
		expect(list.rows.map((x) => [x.serial, x.cameBack, x.comebackOfSerial])).toEqual([
			[head.serial, 1, null],
			[`${head.serial}-C1`, 0, head.serial]
		]);
	});
});

describe('tenancy', () => {
	it('does not find another shop’s head', async () => {
		const head = await newHead();
		const other = await makeShop(db, 'other');
		const seen = await withShop(db, other.shop.id, (tx) => loadHeadView(tx, other.shop.id, head.id));
		expect(seen).toBeNull();
		// Even asking with the head's own shop id while scoped to the other shop finds nothing.
		const sneaky = await withShop(db, other.shop.id, (tx) => loadHeadView(tx, shopId, head.id));
		expect(sneaky).toBeNull();
		const r = await withShop(db, other.shop.id, (tx) => saveEntries(tx, shopId, who, head.id, 'as_received', { cells: [{ pos: '1-intake-1', field: 'margin', text: '1' }], units: {}, instruments: {} }));
		expect(r).toMatchObject({ ok: false, code: 404 });
	});

	it('keeps limits unique per day: a second change the same day replaces it', async () => {
		const { replaced } = await withShop(db, shopId, (tx) =>
			saveLimitVersion(tx, { shopId, familyId, measurement: 'margin', side: 'exhaust', stage: 'as_received', min: 1, max: null, effectiveFrom: '2031-01-01', note: 'a', createdBy: owner.userId })
		);
		expect(replaced).toBeNull();
		const again = await withShop(db, shopId, (tx) =>
			saveLimitVersion(tx, { shopId, familyId, measurement: 'margin', side: 'exhaust', stage: 'as_received', min: 1.1, max: null, effectiveFrom: '2031-01-01', note: 'b', createdBy: owner.userId })
		);
		expect(again.replaced?.min).toBe(1);
		const rows = await withShop(db, shopId, (tx) => tx.select().from(limits).where(and(eq(limits.familyId, familyId), eq(limits.measurement, 'margin'))));
		expect(rows.map((r) => r.min)).toEqual([1.1]);
	});
});
