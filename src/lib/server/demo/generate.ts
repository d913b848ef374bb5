// Deterministic demo data for Lapmark: invented shops, engine families, limits, gauges, users
// and a couple of years of cylinder heads with their readings. The same options always give
// byte-identical output, so tests can hash it and `npm start` can print the same sign-ins.
//
// Everything here is invented: shop, person, customer and family names, serial formats, tokens.
// Readings are plain objects; the bulk of them (readings) come from a generator so that a full
// seed streams into COPY instead of holding a million objects in memory.
//
// The parts: types.ts (options and rows), catalogue.ts (the invented shops, families, gauges),
// random.ts (seeds, ids, day numbers), people.ts (sign-ins, users, machinists), families.ts
// (families and limit versions), heads.ts (each head's life), readings.ts (its readings).
import type { Measurement } from '../../measurements';
import { INSTRUMENT_FOR, INSTRUMENTS, SHOP_TEMPLATES, type ShopTemplate } from './catalogue';
import type { BuildState, HeadPlan, ShopContext } from './context';
import { familiesOf } from './families';
import { shopHeads } from './heads';
import { demoSignIns, machinistsOf, normalise, shopPeople, shopSlug } from './people';
import { readingsOf } from './readings';
import { dateOf, dayOf, mix, Rng, stampOf, uuidOf } from './random';
import type { ApiTokenRow, DemoData, DemoOptions, FamilyRow, HeadRow, InstrumentRow, LimitRow, MembershipRow, ReadingRow, ShopRow, UserRow } from './types';

export type * from './types';
export { SHOP_TEMPLATES, STEM_OFFSET } from './catalogue';
export { demoSignIns } from './people';
export { Rng } from './random';

/** The shop's gauges (the overdue one last calibrated a little over one interval ago), and which takes which reading. */
function shopGauges(seed: number, t: ShopTemplate, shop: ShopRow, shopRng: Rng, endDay: number) {
	const instruments: InstrumentRow[] = [];
	const instrumentFor = new Map<Measurement, string>();
	const byKind = new Map<string, string>();
	for (const it of INSTRUMENTS) {
		const id = uuidOf(seed, `instrument|${shop.slug}|${it.code}`);
		byKind.set(it.kind, id);
		const age = it.kind === t.overdue ? it.intervalDays + shopRng.int(20, 45) : shopRng.int(10, it.intervalDays - 20);
		instruments.push({
			id,
			shopId: shop.id,
			name: it.name,
			kind: it.kind,
			serial: `${t.serialPrefix}-${it.code}-01`,
			resolutionMm: it.resolutionMm,
			calibratedOn: dateOf(endDay - age),
			intervalDays: it.intervalDays,
			retired: false
		});
	}
	for (const [m, kind] of Object.entries(INSTRUMENT_FOR)) instrumentFor.set(m as Measurement, byKind.get(kind)!);
	return { instruments, instrumentFor };
}

/** Builds the whole demo. Pure: the same options give the same objects, in the same order. */
export function generateDemo(options: DemoOptions): DemoData {
	const o = normalise(options);
	const seed = o.seed;
	const endDay = dayOf(o.endDate);
	const spanDays = Math.round(o.months * 30.4375);
	const startDay = endDay - spanDays;
	const signIns = demoSignIns(o);

	const shops: ShopRow[] = [];
	const users: UserRow[] = [];
	const memberships: MembershipRow[] = [];
	const families: FamilyRow[] = [];
	const limits: LimitRow[] = [];
	const instruments: InstrumentRow[] = [];
	const apiTokens: ApiTokenRow[] = [];
	const heads: HeadRow[] = [];
	const st: BuildState = { seed, endDay, decisions: [], leakage: [], readingCount: 0 };
	const plansByShop = new Map<string, { ctx: ShopContext; plans: HeadPlan[] }>();

	const templates = SHOP_TEMPLATES.slice(0, o.shops);
	const shares = o.shops === 1 ? [1] : [0.6, 0.4];
	let assigned = 0;

	templates.forEach((t, si) => {
		const slug = shopSlug(t, o.slugSuffix);
		const shopRng = new Rng(mix(seed, 'shop', si));
		const shop: ShopRow = { id: uuidOf(seed, `shop|${slug}`), name: t.name, slug, settings: { ...t.settings } };
		shops.push(shop);

		const people = shopPeople(seed, shop.id, signIns.filter((x) => x.shop === slug), stampOf(startDay - 30, 9 * 3600));
		users.push(...people.users);
		memberships.push(...people.memberships);
		apiTokens.push(...people.apiTokens);
		// The shop's random numbers in a fixed order: gauges, machinists, then arrival days.
		const gauges = shopGauges(seed, t, shop, shopRng, endDay);
		instruments.push(...gauges.instruments);
		const ctx: ShopContext = {
			t,
			shop,
			families: [],
			limits: new Map(),
			instrumentFor: gauges.instrumentFor,
			machinists: machinistsOf(t, shopRng),
			users: people.roleUsers,
			tightenDay: t.tightened ? endDay - 365 : null,
			limitCache: new Map()
		};
		const fams = familiesOf(seed, ctx, t.families, startDay - 30);
		families.push(...fams.families);
		limits.push(...fams.limits);

		const count = si === templates.length - 1 ? o.headsTotal - assigned : Math.round(o.headsTotal * shares[si]);
		assigned += count;
		const all = shopHeads(ctx, st, shopRng, { startDay, spanDays }, count);
		for (const p of all) heads.push(p.row);
		plansByShop.set(shop.id, { ctx, plans: all });
	});

	function* readings(shopId?: string): Generator<ReadingRow> {
		for (const [id, { ctx, plans }] of plansByShop) {
			if (shopId && id !== shopId) continue;
			for (const plan of plans) yield* readingsOf(ctx, plan);
		}
	}

	return {
		options: o,
		shops,
		users,
		memberships,
		families,
		limits,
		instruments,
		apiTokens,
		heads,
		decisions: st.decisions,
		cylinderLeakage: st.leakage,
		readings,
		counts: {
			shops: shops.length,
			users: users.length,
			memberships: memberships.length,
			families: families.length,
			limits: limits.length,
			instruments: instruments.length,
			apiTokens: apiTokens.length,
			heads: heads.length,
			readings: st.readingCount,
			decisions: st.decisions.length,
			cylinderLeakage: st.leakage.length
		},
		signIns
	};
}
