// The shop's engine families and their limit versions: the service limits and rework spec each
// family starts with, the tightened second version, and the limits in force on a day.
import type { Measurement, Side, Stage } from '../../measurements';
import { CLEARANCE_NEW, CLEARANCE_SERVICE_MAX, MARGIN_MIN, SEAT_WIDTH, STEM_OFFSET, type FamilyTemplate } from './catalogue';
import type { LimitIndex, LimitVersion, ShopContext, SideLimits } from './context';
import { dateOf, dayOf, q3, uuidOf } from './random';
import type { FamilyRow, LimitRow } from './types';

export const limitKey = (familyId: string, m: Measurement, side: Side, stage: Stage) => `${familyId}|${m}|${side}|${stage}`;

export function limitAt(index: LimitIndex, familyId: string, m: Measurement, side: Side, stage: Stage, day: number) {
	const versions = index.get(limitKey(familyId, m, side, stage));
	if (!versions) return null;
	let hit: LimitVersion | null = null;
	for (const v of versions) if (v.from <= day && (!hit || v.from > hit.from)) hit = v;
	return hit;
}

/** The as-received and rework limits in effect for a family side on a day, memoised per day. */
export function sideLimits(ctx: ShopContext, familyId: string, side: Side, day: number): SideLimits {
	const key = `${familyId}|${side}|${day}`;
	const hit = ctx.limitCache.get(key);
	if (hit) return hit;
	const lim = (m: Measurement, stage: Stage = 'as_received') => limitAt(ctx.limits, familyId, m, side, stage, day);
	const width = lim('seat_width');
	const out: SideLimits = {
		clrService: lim('clearance')?.max ?? CLEARANCE_SERVICE_MAX[side],
		clrRework: lim('clearance', 'final')?.max ?? CLEARANCE_NEW[side][1],
		stemMin: lim('stem_diameter')?.min ?? 0,
		marginMin: lim('margin')?.min ?? 0,
		faceMax: lim('face_runout')?.max ?? Infinity,
		seatMax: lim('seat_runout')?.max ?? Infinity,
		widthMin: width?.min ?? null,
		widthMax: width?.max ?? null
	};
	ctx.limitCache.set(key, out);
	return out;
}

function limitRowsFor(seed: number, ctx: ShopContext, fam: FamilyRow, fromDay: number): LimitRow[] {
	const out: LimitRow[] = [];
	const add = (m: Measurement, side: Side, stage: Stage, min: number | null, max: number | null, from: number, note: string) => {
		const effectiveFrom = dateOf(from);
		out.push({
			id: uuidOf(seed, `limit|${fam.id}|${m}|${side}|${stage}|${effectiveFrom}`),
			shopId: fam.shopId,
			familyId: fam.id,
			measurement: m,
			side,
			stage,
			min,
			max,
			effectiveFrom,
			note,
			createdBy: ctx.users.engineer
		});
	};
	for (const side of ['intake', 'exhaust'] as const) {
		const nominal = side === 'intake' ? fam.intakeStemMm : fam.exhaustStemMm;
		const newStem = nominal - STEM_OFFSET[side];
		const n = 'Service limits';
		add('stem_diameter', side, 'as_received', q3(newStem - 0.025), null, fromDay, n);
		add('guide_bore', side, 'as_received', null, q3(nominal + 0.075), fromDay, n);
		add('clearance', side, 'as_received', null, CLEARANCE_SERVICE_MAX[side], fromDay, n);
		add('face_runout', side, 'as_received', null, 0.04, fromDay, n);
		add('seat_runout', side, 'as_received', null, 0.05, fromDay, n);
		add('seat_width', side, 'as_received', SEAT_WIDTH[side][0], SEAT_WIDTH[side][1], fromDay, n);
		add('margin', side, 'as_received', MARGIN_MIN[side], null, fromDay, n);
		const r = 'Rework spec';
		add('stem_diameter', side, 'final', q3(newStem - 0.025), q3(newStem + 0.015), fromDay, r);
		add('guide_bore', side, 'final', q3(nominal), q3(nominal + 0.045), fromDay, r);
		add('clearance', side, 'final', CLEARANCE_NEW[side][0], CLEARANCE_NEW[side][1], fromDay, r);
		add('seat_runout', side, 'final', null, 0.05, fromDay, r);
		add('seat_width', side, 'final', SEAT_WIDTH[side][0], SEAT_WIDTH[side][1], fromDay, r);
		add('roughness_ra', side, 'final', null, 0.25, fromDay, r);
		add('vacuum_hold', side, 'final', ctx.shop.settings.vacuumHoldPassPct, null, fromDay, r);
		add('fluid_hold', side, 'final', ctx.shop.settings.fluidHoldPassSeconds, null, fromDay, r);
		if (ctx.tightenDay != null && ctx.t.tightened === fam.code) {
			// A second, tighter version: old readings stay judged by the limits of their day.
			const t = 'Tightened after a run of comebacks';
			add('clearance', side, 'as_received', null, side === 'intake' ? 0.09 : 0.1, ctx.tightenDay, t);
			add('seat_runout', side, 'as_received', null, 0.04, ctx.tightenDay, t);
		}
	}
	return out;
}

/** The shop's families from its templates, each with its limit versions (also indexed in ctx). */
export function familiesOf(seed: number, ctx: ShopContext, templates: readonly FamilyTemplate[], fromDay: number): { families: FamilyRow[]; limits: LimitRow[] } {
	const families: FamilyRow[] = [];
	const limits: LimitRow[] = [];
	for (const ft of templates) {
		const row: FamilyRow = {
			id: uuidOf(seed, `family|${ctx.shop.slug}|${ft.code}`),
			shopId: ctx.shop.id,
			code: ft.code,
			description: ft.description,
			cylinders: ft.cylinders,
			intakeValves: ft.intakeValves,
			exhaustValves: ft.exhaustValves,
			intakeStemMm: ft.intakeStemMm,
			exhaustStemMm: ft.exhaustStemMm
		};
		families.push(row);
		ctx.families.push({ t: ft, row });
		for (const l of limitRowsFor(seed, ctx, row, fromDay)) {
			limits.push(l);
			const key = limitKey(l.familyId, l.measurement, l.side, l.stage);
			const list = ctx.limits.get(key) ?? [];
			list.push({ from: dayOf(l.effectiveFrom), min: l.min, max: l.max });
			ctx.limits.set(key, list);
		}
	}
	return { families, limits };
}
