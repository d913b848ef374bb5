// The demo generator: deterministic, inside every CHECK constraint of the schema, and shaped
// like the trade (exhaust guides wear faster, seal retests, comebacks, versioned limits).
import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { generateDemo, demoSignIns, type DemoData, type ReadingRow } from './generate';

const END = '2026-12-01';

/** SHA-256 over everything the generator returns, readings included, in order. */
function digest(d: DemoData): string {
	const h = createHash('sha256');
	const { readings, ...rest } = d;
	h.update(JSON.stringify(rest));
	for (const r of readings()) h.update(JSON.stringify(r));
	return h.digest('hex');
}

let full: DemoData;
let all: ReadingRow[];
beforeAll(() => {
	// One full-size demo (3000 heads) shared by the tests below.
	full = generateDemo({ endDate: END });
	all = [...full.readings()];
});

describe('determinism', () => {
	it('gives byte-identical output for the same seed and end date', () => {
		const a = generateDemo({ endDate: END, headsTotal: 300 });
		const b = generateDemo({ endDate: END, headsTotal: 300 });
		expect(digest(a)).toBe(digest(b));
	});

	it('gives different output for a different seed', () => {
		const a = generateDemo({ endDate: END, headsTotal: 300 });
		const b = generateDemo({ endDate: END, headsTotal: 300, seed: 7 });
		expect(digest(a)).not.toBe(digest(b));
		expect(a.signIns[0].token).not.toBe(b.signIns[0].token);
	});

	it('prints the same sign-ins without generating the history', () => {
		expect(demoSignIns()).toEqual(full.signIns);
	});

	it('keeps test shops apart with a slug suffix', () => {
		const d = generateDemo({ endDate: END, headsTotal: 20, slugSuffix: 't1' });
		expect(d.shops.map((s) => s.slug)).toEqual(['brackenford-t1', 'saltmarsh-t1']);
		expect(d.users.every((u) => u.email.endsWith('-t1.example'))).toBe(true);
		expect(d.shops[0].id).not.toBe(full.shops[0].id);
	});
});

describe('counts', () => {
	it('matches the readings the iterator yields', () => {
		expect(all.length).toBe(full.counts.readings);
		expect(full.counts.heads).toBe(full.heads.length);
	});

	it('has the expected sizes', () => {
		const c = full.counts;
		expect(c).toMatchObject({ shops: 2, users: 8, memberships: 8, apiTokens: 8, families: 10, instruments: 12 });
		expect(c.heads).toBeGreaterThanOrEqual(3000);
		expect(c.heads).toBeLessThan(3100);
		expect(c.readings).toBeGreaterThan(600_000);
		expect(c.readings).toBeLessThan(900_000);
		expect(c.decisions).toBeGreaterThan(40_000);
		const perShop = full.shops.map((s) => full.heads.filter((h) => h.shopId === s.id && !h.comebackOf).length);
		expect(perShop).toEqual([1800, 1200]);
		const leakHeads = new Set(full.cylinderLeakage.map((l) => l.headId)).size;
		expect(leakHeads / c.heads).toBeGreaterThan(0.15);
		expect(leakHeads / c.heads).toBeLessThan(0.25);
	});

	it('spreads heads over the months before the end date, recent ones still in the shop', () => {
		const days = full.heads.map((h) => Date.parse(h.receivedOn));
		const span = (Math.max(...days) - Math.min(...days)) / 86_400_000;
		expect(span).toBeGreaterThan(700);
		expect(full.heads.every((h) => h.receivedOn <= END && (h.releasedOn ?? '') <= END)).toBe(true);
		const statuses = new Set(full.heads.map((h) => h.status));
		expect([...statuses].sort()).toEqual(['final_check', 'in_rework', 'inspected', 'received', 'released']);
		const open = full.heads.filter((h) => h.status !== 'released');
		expect(open.every((h) => Date.parse(END) - Date.parse(h.receivedOn) < 45 * 86_400_000)).toBe(true);
	});
});

describe('schema CHECK constraints', () => {
	const plausible: Record<string, [number, number]> = {
		clearance: [0, 1],
		face_runout: [0, 2],
		seat_runout: [0, 2],
		stem_diameter: [1, 30],
		guide_bore: [1, 30],
		seat_width: [0, 10],
		margin: [0, 10],
		roughness_ra: [0, 50],
		vacuum_hold: [0, 100],
		leakdown: [0, 100],
		fluid_hold: [0, 3600]
	};

	it('keeps every reading in range, at instrument resolution, and unique by identity', () => {
		const seen = new Set<string>();
		const endMs = Date.parse(`${END}T00:00:00Z`);
		const steps: Record<string, number> = { seat_width: 100, margin: 100, roughness_ra: 100, vacuum_hold: 2, fluid_hold: 1 };
		const bad: string[] = [];
		// Plain checks in the loop: expect() per reading is too slow for 700 000 of them.
		for (const r of all) {
			const [lo, hi] = plausible[r.measurement];
			const step = steps[r.measurement] ?? 1000;
			const by = r.measuredBy.trim().length;
			const key = `${r.headId}|${r.stage}|${r.cylinder}|${r.side}|${r.valve}|${r.measurement}|${r.measuredAt}`;
			if (
				!(r.cylinder >= 1 && r.cylinder <= 16 && r.valve >= 1 && r.valve <= 3) ||
				!(Number.isFinite(r.value) && r.value >= lo && r.value <= hi) ||
				Math.abs(r.value * step - Math.round(r.value * step)) > 1e-6 ||
				by < 1 ||
				by > 120 ||
				Date.parse(r.measuredAt) >= endMs ||
				seen.has(key)
			)
				bad.push(JSON.stringify(r));
			seen.add(key);
		}
		expect(bad.slice(0, 5)).toEqual([]);
		// A pass over some 700 000 readings: about 4 s alone, more beside the other files on two cores.
	}, 30_000);

	it('keeps heads, families, limits, instruments, tokens and leak-down rows valid', () => {
		for (const h of full.heads) {
			expect(h.serial.trim().length).toBeGreaterThan(0);
			expect(h.serial.length).toBeLessThanOrEqual(64);
			expect(h.mileageKm! >= 0 && h.mileageKm! <= 5_000_000).toBe(true);
			expect(h.status === 'released').toBe(h.releasedOn != null);
			if (h.releasedOn) expect(h.releasedOn >= h.receivedOn).toBe(true);
			expect(h.comebackOf).not.toBe(h.id);
		}
		expect(new Set(full.heads.map((h) => `${h.shopId}|${h.serial}`)).size).toBe(full.heads.length);
		for (const f of full.families) {
			expect(f.code).toMatch(/^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$/);
			expect(f.cylinders >= 3 && f.cylinders <= 8).toBe(true);
			expect([1, 2]).toContain(f.intakeValves);
			expect([1, 2]).toContain(f.exhaustValves);
			expect(f.intakeStemMm >= 5 && f.intakeStemMm <= 8 && f.exhaustStemMm >= 5 && f.exhaustStemMm <= 8).toBe(true);
		}
		const limitKeys = new Set<string>();
		for (const l of full.limits) {
			expect(l.min != null || l.max != null).toBe(true);
			if (l.min != null && l.max != null) expect(l.min).toBeLessThanOrEqual(l.max);
			expect((l.min ?? 0) >= 0 && (l.max ?? 0) >= 0).toBe(true);
			limitKeys.add(`${l.familyId}|${l.measurement}|${l.side}|${l.stage}|${l.effectiveFrom}`);
		}
		expect(limitKeys.size).toBe(full.limits.length);
		for (const i of full.instruments) {
			expect(i.intervalDays >= 1 && i.intervalDays <= 3650).toBe(true);
			expect(i.resolutionMm == null || i.resolutionMm > 0).toBe(true);
		}
		for (const t of full.apiTokens) expect(t.tokenHash).toMatch(/^[0-9a-f]{64}$/);
		for (const s of full.shops) expect(s.slug).toMatch(/^[a-z0-9][a-z0-9-]{1,62}$/);
		for (const d of full.decisions) expect(d.cylinder >= 1 && d.valve >= 1 && d.valve <= 3).toBe(true);
		for (const l of full.cylinderLeakage) {
			expect(l.leakagePct >= 0 && l.leakagePct <= 100).toBe(true);
			if (l.pressureInKpa == null) expect(l.pressureHeldKpa).toBeNull();
			else expect(l.pressureHeldKpa! >= 0 && l.pressureHeldKpa! <= l.pressureInKpa).toBe(true);
		}
	});
});

describe('the trade', () => {
	it('has clearance = guide bore − stem diameter at every measured position', () => {
		const groups = new Map<string, Record<string, number>>();
		for (const r of all) {
			if (r.measurement !== 'clearance' && r.measurement !== 'guide_bore' && r.measurement !== 'stem_diameter') continue;
			const key = `${r.headId}|${r.stage}|${r.cylinder}|${r.side}|${r.valve}|${r.measuredAt}`;
			const g = groups.get(key) ?? {};
			g[r.measurement] = r.value;
			groups.set(key, g);
		}
		const groupList = [...groups.values()];
		const off = groupList.filter((g) => !(Math.abs(g.clearance - (g.guide_bore - g.stem_diameter)) < 1e-9));
		expect(off.slice(0, 5)).toEqual([]);
		expect(groupList.length).toBeGreaterThan(90_000);
	});

	it('wears exhaust guides faster than intake guides, and fails them more often', () => {
		const serviceMax = new Map<string, number>();
		for (const l of full.limits)
			if (l.measurement === 'clearance' && l.stage === 'as_received' && !serviceMax.has(`${l.familyId}|${l.side}`))
				serviceMax.set(`${l.familyId}|${l.side}`, l.max!);
		const stat = { intake: { n: 0, sum: 0, fail: 0 }, exhaust: { n: 0, sum: 0, fail: 0 } };
		for (const r of all) {
			if (r.measurement !== 'clearance' || r.stage !== 'as_received') continue;
			const s = stat[r.side];
			s.n++;
			s.sum += r.value;
			if (r.value > serviceMax.get(`${r.familyId}|${r.side}`)!) s.fail++;
		}
		const mean = (s: { n: number; sum: number }) => s.sum / s.n;
		expect(mean(stat.exhaust)).toBeGreaterThan(mean(stat.intake) * 1.3);
		expect(stat.exhaust.fail / stat.exhaust.n).toBeGreaterThan(0.1);
		expect(stat.exhaust.fail / stat.exhaust.n).toBeLessThan(0.25);
		expect(stat.intake.fail / stat.intake.n).toBeLessThan(stat.exhaust.fail / stat.exhaust.n);
	});

	it('retests 2–3 % of final seal tests after a failure, and the retest passes', () => {
		const tests = new Map<string, { at: string; v: number }[]>();
		for (const r of all) {
			if (r.measurement !== 'vacuum_hold') continue;
			const key = `${r.headId}|${r.cylinder}|${r.side}|${r.valve}`;
			tests.set(key, [...(tests.get(key) ?? []), { at: r.measuredAt, v: r.value }]);
		}
		let retested = 0;
		for (const t of tests.values()) {
			if (t.length === 1) continue;
			retested++;
			expect(t).toHaveLength(2);
			expect(t[0].v).toBeLessThan(90);
			expect(t[1].v).toBeGreaterThanOrEqual(90);
			expect(t[1].at > t[0].at).toBe(true);
		}
		expect(retested / tests.size).toBeGreaterThan(0.015);
		expect(retested / tests.size).toBeLessThan(0.035);
		const fluid = all.filter((r) => r.measurement === 'fluid_hold');
		expect(fluid.every((r) => Number.isInteger(r.value) && r.value <= 120)).toBe(true);
	});

	it('links comebacks to released originals, more of them for the worse families', () => {
		const byId = new Map(full.heads.map((h) => [h.id, h]));
		const comebacks = full.heads.filter((h) => h.comebackOf);
		const released = full.heads.filter((h) => h.status === 'released' && !h.comebackOf);
		expect(comebacks.length / released.length).toBeGreaterThan(0.008);
		expect(comebacks.length / released.length).toBeLessThan(0.03);
		for (const c of comebacks) {
			const o = byId.get(c.comebackOf!)!;
			expect(o.status).toBe('released');
			expect(c.serial).toBe(`${o.serial}-C1`);
			expect(c.complaint.startsWith('Comeback:')).toBe(true);
			expect(c.receivedOn > o.releasedOn!).toBe(true);
		}
		const code = new Map(full.families.map((f) => [f.id, f.code]));
		const rate = (codes: string[]) =>
			comebacks.filter((h) => codes.includes(code.get(h.familyId)!)).length /
			released.filter((h) => codes.includes(code.get(h.familyId)!)).length;
		expect(rate(['BIRCH-6', 'FIR-6D'])).toBeGreaterThan(rate(['ALDER-4', 'CEDAR-V8', 'DOGWOOD-4D', 'ELM-3']));
	});

	it('versions the limits of one family, judges decisions by them and records a few overrides', () => {
		const versions = new Map<string, Set<string>>();
		for (const l of full.limits) versions.set(l.familyId, (versions.get(l.familyId) ?? new Set()).add(l.effectiveFrom));
		expect([...versions.values()].filter((v) => v.size === 2)).toHaveLength(1);
		const kinds = new Set(full.decisions.map((d) => d.suggested));
		for (const k of ['lap', 'replace_guide', 'recut_seat', 'replace_valve']) expect(kinds.has(k as never)).toBe(true);
		const lap = full.decisions.filter((d) => d.kind === 'lap').length;
		expect(lap).toBe(Math.max(...['lap', 'reuse', 'knurl_guide', 'replace_guide', 'recut_seat', 'replace_valve'].map((k) => full.decisions.filter((d) => d.kind === k).length)));
		const overrides = full.decisions.filter((d) => d.kind !== d.suggested);
		expect(overrides.length).toBeGreaterThan(50);
		expect(overrides.length / full.decisions.length).toBeLessThan(0.03);
		expect(overrides.every((d) => d.note.length > 0)).toBe(true);
		expect(full.decisions.filter((d) => d.kind === d.suggested).every((d) => d.rule.length > 0)).toBe(true);
	});

	it('has one gauge per shop overdue for calibration', () => {
		for (const s of full.shops) {
			const overdue = full.instruments.filter(
				(i) => i.shopId === s.id && Date.parse(i.calibratedOn) + i.intervalDays * 86_400_000 < Date.parse(END)
			);
			expect(overdue).toHaveLength(1);
		}
	});
});

describe('invented names only', () => {
	// Makers and well-known engine codes that must never appear in demo data.
	const DENY =
		/\b(ford|toyota|honda|chevrolet|chevy|gm|bmw|audi|volkswagen|vw|mercedes|benz|cummins|caterpillar|cat|detroit|nissan|hyundai|kia|mazda|subaru|fiat|renault|peugeot|citroen|volvo|scania|iveco|deutz|perkins|yanmar|kubota|isuzu|mitsubishi|hino|daf|opel|vauxhall|jeep|dodge|chrysler|porsche|ferrari|hemi|ecoboost|duramax|powerstroke|tdi|vtec|2jz|k20|ls1|lsx|rb26|sr20|navistar|paccar|mack|john deere)\b/i;

	it('emits no maker names or codes, and only .example e-mail domains', () => {
		const { readings, ...rest } = full;
		const strings: string[] = [];
		const walk = (v: unknown) => {
			if (typeof v === 'string') strings.push(v);
			else if (Array.isArray(v)) v.forEach(walk);
			else if (v && typeof v === 'object') Object.values(v).forEach(walk);
		};
		walk(rest);
		for (const r of readings()) strings.push(r.measuredBy);
		const hits = strings.filter((s) => DENY.test(s));
		expect(hits).toEqual([]);
		const emails = strings.filter((s) => /^[^@\s]+@[^@\s]+$/.test(s));
		expect(emails.length).toBeGreaterThan(8);
		expect(emails.every((e) => e.endsWith('.example'))).toBe(true);
	});
});
