// The life of each head in a shop: when it arrives, what its positions measure as received, the
// decisions the readings suggest (and the few a person overrides), the rework, the final check,
// the leak-down test and, now and then, a comeback.
import { positionsOf, STAGE_MEASUREMENTS } from '../../inspection';
import type { Side } from '../../measurements';
import { COMEBACK_COMPLAINTS, COMPLAINTS, STEM_OFFSET } from './catalogue';
import type { AsReceived, BuildState, Final, HeadInput, HeadPlan, Outcome, Position, ShopContext } from './context';
import { sideLimits } from './families';
import { clamp, dateOf, dayOf, fmt2, fmt3, mix, q1, q2, q3, qHalf, Rng, stampOf, um, uuidOf, weekday, workday } from './random';
import type { DecisionKind, HeadRow, HeadStatus, LeakPath } from './types';

/** The suggested decision for one position, from its as-received readings and the limits of the day. */
function judge(ctx: ShopContext, familyId: string, side: Side, ar: AsReceived, day: number, mileageKm: number): Outcome {
	const { clrService, clrRework, stemMin, marginMin, faceMax, seatMax, widthMin, widthMax } = sideLimits(ctx, familyId, side, day);

	// Guides come first: every seat cut pilots off the guide.
	let guide: Outcome['guide'] = null;
	let rule = '';
	if (ar.clr > clrService) {
		guide = 'replace';
		rule = `clearance ${fmt3(ar.clr)} > service max ${fmt3(clrService)} mm`;
	} else if (ar.clr > clrRework) {
		// Within the service limit but looser than the rework spec: knurl and ream back to size.
		guide = 'knurl';
		rule = `clearance ${fmt3(ar.clr)} > rework max ${fmt3(clrRework)} mm, within service max`;
	}
	const valveReasons: string[] = [];
	if (ar.stem < stemMin) valveReasons.push(`stem ${fmt3(ar.stem)} < min ${fmt3(stemMin)} mm`);
	if (ar.margin < marginMin) valveReasons.push(`margin ${fmt2(ar.margin)} < min ${fmt2(marginMin)} mm`);
	if (ar.face > faceMax) valveReasons.push(`face runout ${fmt3(ar.face)} > max ${fmt3(faceMax)} mm`);
	const seatReasons: string[] = [];
	if (ar.seat > seatMax) seatReasons.push(`seat runout ${fmt3(ar.seat)} > max ${fmt3(seatMax)} mm`);
	if ((widthMin != null && ar.width < widthMin) || (widthMax != null && ar.width > widthMax))
		seatReasons.push(`seat width ${fmt2(ar.width)} outside ${fmt2(widthMin ?? 0)}–${fmt2(widthMax ?? 0)} mm`);

	let suggested: DecisionKind;
	if (guide === 'replace') {
		suggested = 'replace_guide';
	} else if (valveReasons.length) {
		suggested = 'replace_valve';
		rule = valveReasons[0];
	} else if (guide === 'knurl') {
		suggested = 'knurl_guide';
	} else if (seatReasons.length) {
		suggested = 'recut_seat';
		rule = seatReasons[0];
	} else if (mileageKm < 90_000 && ar.seat <= 0.02 && ar.clr <= clrRework * 0.8) {
		suggested = 'reuse';
		rule = 'all readings well inside limits';
	} else {
		suggested = 'lap';
		rule = 'within limits';
	}
	return { suggested, rule, guide, valve: valveReasons.length > 0, seat: seatReasons.length > 0 };
}

const OVERRIDES: Partial<Record<DecisionKind, { kind: DecisionKind; note: string }[]>> = {
	lap: [
		{ kind: 'reface_valve', note: 'Light pitting on the face; refaced before lapping' },
		{ kind: 'reuse', note: 'Customer asked for no work on this position' }
	],
	recut_seat: [{ kind: 'replace_seat', note: 'Seat insert loose in the head; replaced' }],
	replace_valve: [{ kind: 'reface_valve', note: 'Valve on back order; refaced, margin checked by hand' }],
	knurl_guide: [{ kind: 'replace_guide', note: 'Guide cracked at the top; replaced instead of knurling' }],
	replace_guide: [{ kind: 'knurl_guide', note: 'Customer declined new guides; knurled and reamed' }]
};

/** Stem, bore and clearance from whole micrometres; seat runout and width at the gauges' resolution. */
function guideAndSeat(stemUm: number, boreUm: number, seat: number, width: number) {
	return {
		stem: stemUm / 1000,
		bore: boreUm / 1000,
		clr: (boreUm - stemUm) / 1000,
		seat: q3(clamp(seat, 0.001, 1.9)),
		width: q2(clamp(width, 0.6, 4))
	};
}

function simulateHead(ctx: ShopContext, st: BuildState, h: HeadInput): HeadPlan {
	const { rng, fam } = h;
	const shopId = ctx.shop.id;
	const id = uuidOf(st.seed, `head|${ctx.shop.slug}|${h.serial}`);

	// Job timeline: inspection a few days after arrival, decisions within a few days, rework
	// (longer on diesels, waiting for parts), final check, release when the customer collects.
	// Events with a time stamp end the day before endDate.
	const inspectDay = workday(h.receivedDay + rng.int(1, 4));
	const reworkDay = workday(inspectDay + rng.int(1, 3));
	const finalDay = workday(reworkDay + rng.int(3, 12) + (fam.t.diesel ? 3 : 0));
	const releaseDay = workday(finalDay + rng.int(1, 4));
	const lastStamped = st.endDay - 1;
	let status: HeadStatus = 'received';
	if (releaseDay <= st.endDay) status = 'released';
	else if (finalDay <= lastStamped) status = 'final_check';
	else if (reworkDay <= lastStamped) status = 'in_rework';
	else if (inspectDay <= lastStamped) status = 'inspected';

	const people = ctx.machinists;
	const arBy = rng.pick(people);
	const finalBy = rng.chance(0.7) ? arBy : rng.pick(people);
	const customerSlug = h.customer.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
	const row: HeadRow = {
		id,
		shopId,
		familyId: fam.row.id,
		serial: h.serial,
		customer: h.customer,
		customerEmail: rng.chance(0.6) ? `service@${customerSlug}.example` : null,
		receivedOn: dateOf(h.receivedDay),
		releasedOn: status === 'released' ? dateOf(releaseDay) : null,
		mileageKm: h.mileageKm,
		engineHours: null,
		complaint: h.complaint,
		status,
		comebackOf: h.comebackOf?.row.id ?? null
	};
	const plan: HeadPlan = { row, arBy: arBy.name, finalBy: finalBy.name, positions: [] };

	// Wear grows a little faster than mileage; a head's history (oil, service) scales all its
	// positions together, and each position varies on its own. Comebacks start from the rework.
	const mk = h.comebackOf ? (h.mileageKm - (h.comebackOf.row.mileageKm ?? 0)) / 100_000 : h.mileageKm / 100_000;
	const headFactor = rng.ln(0.3);
	const priorGrind = !h.comebackOf && rng.chance(0.2);
	const defect = h.comebackOf ? rng.int(0, 1_000_000) : -1;

	const positions = positionsOf(fam.t);
	const defectIndex = defect >= 0 ? defect % positions.length : -1;
	const hasAr = status !== 'received';
	const hasDecision = status === 'in_rework' || status === 'final_check' || status === 'released';
	const hasFinal = status === 'final_check' || status === 'released';
	const arStart = 7 * 3600 + rng.int(0, 6 * 3600);
	const finStart = 7 * 3600 + rng.int(0, 6 * 3600);

	positions.forEach((p, i) => {
		const nominal = p.side === 'intake' ? fam.t.intakeStemMm : fam.t.exhaustStemMm;
		const exhaust = p.side === 'exhaust';
		const original = h.comebackOf?.positions[i];
		// Knurled guides are a short-term repair: they loosen again quickly.
		const knurled = original?.kind === 'knurl_guide';
		const guideWear =
			0.0068 * (exhaust ? 1.6 : 1) * fam.t.wear * headFactor * rng.ln(0.45) * Math.pow(Math.max(mk, 0), 1.1) * (knurled ? 4 : 1);
		const seatWear = 0.045 * (exhaust ? 1.4 : 1) * Math.sqrt(fam.t.wear) * headFactor * rng.ln(0.5) * Math.max(mk, 0);

		let stemUm = um(nominal - STEM_OFFSET[p.side] + rng.n(0, 0.003) - guideWear * (exhaust ? 0.14 : 0.1));
		let boreUm = um(nominal + 0.01 + rng.n(0, 0.003) + guideWear);
		let face = Math.abs(rng.n(0.008, 0.006)) + 0.05 * seatWear;
		let seat = 0.006 + 0.28 * guideWear + Math.abs(rng.n(0, 0.007)) + (exhaust ? Math.abs(rng.n(0, 0.005)) : 0);
		let width = (exhaust ? 1.82 : 1.28) + rng.n(0, 0.07) + seatWear * 1.1;
		let margin = (exhaust ? 1.55 : 1.35) + rng.n(0, 0.07) - seatWear * (exhaust ? 0.8 : 0.6) - (priorGrind ? 0.25 : 0);

		// A handful of gross outliers: a cracked guide, a bent valve, a loose seat insert.
		const r = rng.u();
		if (r < 0.0006) boreUm += um(rng.range(0.25, 0.5));
		else if (r < 0.0012) face = rng.range(0.3, 0.9);
		else if (r < 0.0018) seat = rng.range(0.2, 0.6);
		if (i === defectIndex) {
			if (rng.chance(0.5)) seat = rng.range(0.07, 0.14);
			else boreUm += um(rng.range(0.06, 0.12));
		}
		// Keep the as-received clearance within the schema's plausible range.
		boreUm = Math.min(boreUm, stemUm + 950);
		const ar: AsReceived = {
			...guideAndSeat(stemUm, boreUm, seat, width),
			face: q3(clamp(face, 0, 1.9)),
			margin: q2(clamp(margin, 0.3, 3))
		};
		const pos: Position = {
			cylinder: p.cylinder,
			side: p.side,
			valve: p.valve,
			ar,
			arAt: stampOf(inspectDay, arStart + i * 45),
			fin: null,
			finAt: '',
			retestAt: '',
			kind: null
		};
		plan.positions.push(pos);
		if (!hasAr) return;
		st.readingCount += STAGE_MEASUREMENTS.as_received.length;
		if (!hasDecision) return;

		const outcome = judge(ctx, fam.row.id, p.side, ar, inspectDay, h.mileageKm);
		let kind = outcome.suggested;
		let note = '';
		let decidedBy = ctx.users.machinist;
		const alternatives = OVERRIDES[kind];
		if (alternatives && rng.chance(0.012)) {
			const alt = rng.pick(alternatives);
			kind = alt.kind;
			note = alt.note;
			decidedBy = ctx.users.engineer;
		}
		pos.kind = kind;
		st.decisions.push({
			id: uuidOf(st.seed, `decision|${id}|${p.cylinder}|${p.side}|${p.valve}`),
			shopId,
			headId: id,
			cylinder: p.cylinder,
			side: p.side,
			valve: p.valve,
			suggested: outcome.suggested,
			rule: outcome.rule,
			kind,
			note,
			decidedBy,
			decidedAt: stampOf(reworkDay, 7 * 3600 + 1800 + i * 20)
		});
		if (!hasFinal) return;

		// Rework: every needed repair is done, the decision records the main one.
		const guideWork = kind === 'replace_guide' || kind === 'knurl_guide' || (outcome.guide !== null && kind !== 'reuse');
		const newValve = kind === 'replace_valve' || (outcome.valve && kind !== 'reface_valve' && kind !== 'reuse');
		const seatWork = guideWork || outcome.seat || kind === 'recut_seat' || kind === 'replace_seat';
		const fStemUm = newValve ? um(nominal - STEM_OFFSET[p.side] + rng.n(0, 0.002)) : stemUm + rng.int(-1, 1);
		let fBoreUm = guideWork
			? um(nominal + 0.01 + finalBy.boreBias + rng.n(0, finalBy.boreSd))
			: boreUm + rng.int(-1, 1);
		// A bore never ends up tighter than the stem it has to take.
		fBoreUm = Math.max(fBoreUm, fStemUm + 12);
		const fSeat = seatWork ? 0.004 + Math.abs(rng.n(0.006, 0.005)) : ar.seat;
		const fWidth = seatWork ? (exhaust ? 1.8 : 1.28) + rng.n(0, 0.08) : ar.width + rng.range(0, 0.04);
		const ra = clamp(0.13 * finalBy.raFactor * rng.ln(0.3), 0.03, 2);
		const leaky = rng.chance(0.025);
		const fin: Final = {
			...guideAndSeat(fStemUm, fBoreUm, fSeat, fWidth),
			ra: q2(ra),
			vac: qHalf(clamp(100 - Math.abs(rng.n(0, 2.2)), 91, 100)),
			fluid: 120,
			vacFirst: leaky ? qHalf(rng.range(70, 88.5)) : null,
			fluidFirst: leaky ? rng.int(15, 110) : null
		};
		pos.fin = fin;
		pos.finAt = stampOf(finalDay, finStart + i * 50);
		if (leaky) pos.retestAt = stampOf(finalDay, finStart + i * 50 + rng.int(35, 90) * 60);
		st.readingCount += STAGE_MEASUREMENTS.final.length + (leaky ? 2 : 0);
	});

	if (rng.chance(0.2)) leakDown(st, h, plan, id);
	return plan;
}

/**
 * In-vehicle leak-down for about a fifth of the jobs: the worst position of a cylinder
 * decides how much it leaks and where the air is heard.
 */
function leakDown(st: BuildState, h: HeadInput, plan: HeadPlan, id: string): void {
	const { rng, fam } = h;
	const shopId = plan.row.shopId;
	const coolant = /coolant|gasket/i.test(h.complaint) && rng.chance(0.6);
	const coolantCyl = rng.int(1, fam.t.cylinders);
	for (let c = 1; c <= fam.t.cylinders; c++) {
		const cyl = plan.positions.filter((p) => p.cylinder === c);
		let worst: Position | null = null;
		let badness = 0;
		for (const p of cyl) {
			const b = Math.max(p.ar.seat / 0.05, p.ar.face / 0.04, (p.side === 'exhaust' ? 1.0 : 0.8) / Math.max(p.ar.margin, 0.3));
			if (b > badness) {
				badness = b;
				worst = p;
			}
		}
		let pct = clamp(rng.n(6, 2.5), 1, 10);
		let path: LeakPath = 'none';
		if (coolant && c === coolantCyl) {
			pct = rng.range(15, 35);
			path = 'coolant';
		} else if (badness > 1 && worst) {
			pct = clamp(8 + 14 * (badness - 1) + rng.n(0, 4), 11, 85);
			path = worst.side;
		} else if (rng.chance(0.08)) {
			pct = rng.range(12, 28);
			path = 'crankcase';
		}
		const withGauge = rng.chance(0.85);
		// Differential gauge: leakage % = (in − held) / in × 100, from the gauge readings.
		const pin = withGauge ? 690 : null;
		const held = pin != null ? Math.round(pin * (1 - pct / 100)) : null;
		const leakagePct = pin != null && held != null ? q1(((pin - held) / pin) * 100) : q1(pct);
		st.leakage.push({
			id: uuidOf(st.seed, `leak|${id}|${c}`),
			shopId,
			headId: id,
			cylinder: c,
			leakagePct,
			pressureInKpa: pin,
			pressureHeldKpa: held,
			leakPath: path
		});
	}
}

/**
 * Every head of one shop: `count` original jobs on arrival days spread over the span (slowly
 * growing business, few heads at the weekend), plus their comebacks; sorted by received date,
 * then serial, so an original always precedes its comeback.
 */
export function shopHeads(ctx: ShopContext, st: BuildState, shopRng: Rng, span: { startDay: number; spanDays: number }, count: number): HeadPlan[] {
	const { seed, endDay } = st;
	const { startDay, spanDays } = span;
	const t = ctx.t;
	const slug = ctx.shop.slug;
	const days: number[] = [];
	for (let i = 0; i < count; i++) {
		let d = startDay + Math.floor(Math.pow(shopRng.u(), 0.85) * (spanDays + 1));
		if ((weekday(d) === 0 || weekday(d) === 6) && shopRng.chance(0.85)) d = workday(d);
		days.push(Math.min(d, endDay));
	}
	days.sort((a, b) => a - b);

	const plans: HeadPlan[] = [];
	const comebacks: HeadPlan[] = [];
	days.forEach((day, i) => {
		const rng = new Rng(mix(seed, slug, 'head', i));
		const fam = rng.weighted(ctx.families.map((f) => ({ ...f, weight: f.t.weight })));
		const u = rng.u();
		const mileage = Math.round(40_000 + 410_000 * Math.pow(u, fam.t.diesel ? 0.8 : 1.3));
		const yy = dateOf(day).slice(2, 4);
		const serial = `${fam.t.prefix}${yy}-${String(i + 1).padStart(5, '0')}`;
		const plan = simulateHead(ctx, st, {
			rng,
			fam,
			serial,
			customer: rng.pick(t.customers),
			receivedDay: day,
			mileageKm: mileage,
			complaint: rng.pick(COMPLAINTS),
			comebackOf: null
		});
		plans.push(plan);

		// Comebacks: more for the families that wear worse and after knurled guides; fewer for
		// the family whose limits were tightened, once the new limits apply.
		if (plan.row.status !== 'released') return;
		const cbRng = new Rng(mix(seed, slug, 'comeback', i));
		let p = 0.006 * (fam.t.wear > 1.5 ? 3.2 : 1);
		if (plan.positions.some((x) => x.kind === 'knurl_guide')) p *= 1.8;
		if (ctx.tightenDay != null && t.tightened === fam.t.code && day >= ctx.tightenDay) p *= 0.4;
		if (!cbRng.chance(p)) return;
		const back = dayOf(plan.row.releasedOn!) + 10 + Math.round(-60 * Math.log(1 - cbRng.u()));
		if (back > endDay) return;
		comebacks.push(
			simulateHead(ctx, st, {
				rng: cbRng,
				fam,
				serial: `${serial}-C1`,
				customer: plan.row.customer,
				receivedDay: workday(back) > endDay ? back : workday(back),
				mileageKm: mileage + cbRng.int(1_500, 25_000),
				complaint: cbRng.pick(COMEBACK_COMPLAINTS),
				comebackOf: plan
			})
		);
	});
	const all = [...plans, ...comebacks].sort(
		(a, b) => (a.row.receivedOn < b.row.receivedOn ? -1 : a.row.receivedOn > b.row.receivedOn ? 1 : a.row.serial < b.row.serial ? -1 : 1)
	);
	return all;
}
