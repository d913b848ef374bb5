// The head's way through the shop: intake, decisions, release and comebacks. Each tx-taking
// function runs inside the caller's transaction, checks everything before it writes, and audits
// what it changed in the same transaction. The functions at the end are what the pages call: each
// opens the shop's scope and turns a refusal into a DomainError.
import { distanceToKm, leakagePercent, pressureToKpa, type PressureUnit } from '$lib/measurements';
import { hasPosition, parsePosKey, posKey, posLabel, type Position } from '$lib/inspection';
import { inShop } from '../db';
import type { Tx } from '../db/scope';
import type { DecisionKind, LeakPath } from '../db/schema';
import { conflict, DomainError } from '../errors';
import { audit } from '../queries/audit';
import { upsertDecision } from '../queries/entry';
import { familyById, listFamilies } from '../queries/families';
import {
	customerEmails,
	customersOf,
	headRow,
	insertComeback,
	insertHead,
	insertLeakage,
	listHeads,
	markReleased,
	nextComebackSerial,
	serialTaken,
	setHeadStatus,
	type HeadFilter
} from '../queries/heads';
import { seatCutWarning } from './decisions';
import type { Who } from './entry';
import { loadHeadView, releaseBlockers, today, viewOrRefuse, type ReleaseBlocker } from './head-view';

export type Refusal = { ok: false; code: 400 | 404 | 409; message: string; errors: Record<string, string> };
const refuse = (code: Refusal['code'], message: string, errors: Record<string, string> = {}): Refusal => ({ ok: false, code, message, errors });

// ---------------------------------------------------------------------------------------------
// Intake

export interface LeakEntry {
	cylinder: number;
	/** Either the percentage … */
	pct: number | null;
	/** … or the two gauge pressures in `unit`. */
	pin: number | null;
	held: number | null;
	path: LeakPath;
}

export interface IntakeData {
	serial: string;
	familyId: string;
	customer: string;
	customerEmail: string | null;
	receivedOn: string;
	usageUnit: 'km' | 'mi' | 'h';
	usage: number | null;
	complaint: string;
	leakMode: 'pct' | 'pressure';
	pressureUnit: PressureUnit;
	leaks: LeakEntry[];
}

export async function intakeHead(tx: Tx, shopId: string, who: Who, d: IntakeData) {
	const errors: Record<string, string> = {};
	const family = await familyById(tx, shopId, d.familyId);
	if (!family) return refuse(400, 'Choose an engine family of this shop.', { familyId: 'Choose an engine family of this shop.' });
	if (d.receivedOn > today()) errors.receivedOn = 'A head cannot arrive in the future.';
	if (await serialTaken(tx, shopId, d.serial)) errors.serial = `Head ${d.serial} is already on record. For a head that came back, record a comeback on the original.`;
	const leakRows: { cylinder: number; leakagePct: number; pressureInKpa: number | null; pressureHeldKpa: number | null; leakPath: LeakPath }[] = [];
	for (const l of d.leaks) {
		const key = `leak.${l.cylinder}`;
		if (l.cylinder > family.cylinders) {
			if (l.pct !== null || l.pin !== null || l.held !== null) errors[key] = `${family.code} has ${family.cylinders} cylinders.`;
			continue;
		}
		if (d.leakMode === 'pct') {
			if (l.pct === null) {
				if (l.path !== 'none') errors[key] = 'Type the leakage for this cylinder, or set the leak path back to “not heard”.';
				continue;
			}
			leakRows.push({ cylinder: l.cylinder, leakagePct: l.pct, pressureInKpa: null, pressureHeldKpa: null, leakPath: l.path });
		} else {
			if (l.pin === null && l.held === null) {
				if (l.path !== 'none') errors[key] = 'Type the gauge pressures for this cylinder, or set the leak path back to “not heard”.';
				continue;
			}
			if (l.pin === null || l.held === null) {
				errors[key] = 'Type both pressures: in and held.';
				continue;
			}
			if (!(l.pin > 0)) {
				errors[key] = 'The pressure in must be above zero.';
				continue;
			}
			if (l.held > l.pin) {
				errors[key] = 'The held pressure cannot be above the pressure in.';
				continue;
			}
			const pin = pressureToKpa(l.pin, d.pressureUnit);
			const held = pressureToKpa(l.held, d.pressureUnit);
			leakRows.push({ cylinder: l.cylinder, leakagePct: leakagePercent(l.pin, l.held), pressureInKpa: pin, pressureHeldKpa: held, leakPath: l.path });
		}
	}
	if (Object.keys(errors).length) return refuse(400, 'The head was not saved: correct the fields marked.', errors);

	const head = await insertHead(tx, {
		shopId,
		familyId: family.id,
		serial: d.serial,
		customer: d.customer,
		customerEmail: d.customerEmail,
		receivedOn: d.receivedOn,
		mileageKm: d.usage !== null && d.usageUnit !== 'h' ? distanceToKm(d.usage, d.usageUnit) : null,
		engineHours: d.usage !== null && d.usageUnit === 'h' ? Math.round(d.usage) : null,
		complaint: d.complaint,
		status: 'received'
	});
	await insertLeakage(
		tx,
		leakRows.map((r) => ({ ...r, shopId, headId: head.id }))
	);
	await audit(tx, shopId, who, {
		entity: 'head',
		entityId: head.id,
		action: 'create',
		after: { serial: head.serial, family: family.code, customer: head.customer, receivedOn: head.receivedOn, mileageKm: head.mileageKm, engineHours: head.engineHours, usageTyped: d.usage !== null ? `${d.usage} ${d.usageUnit}` : null, leakage: leakRows }
	});
	return { ok: true as const, head };
}

// ---------------------------------------------------------------------------------------------
// Decisions

export async function recordDecision(tx: Tx, shopId: string, who: Who, headId: string, d: { pos: string; kind: DecisionKind; note: string; acknowledge: boolean }) {
	const head = await headRow(tx, shopId, headId, { lock: true });
	if (!head) return refuse(404, 'No such head in this shop.');
	if (head.status === 'released') return refuse(409, `Head ${head.serial} was released; its decisions are closed.`);
	const view = await loadHeadView(tx, shopId, headId);
	if (!view) return refuse(404, 'No such head in this shop.');
	const pos = parsePosKey(d.pos);
	if (!pos || !hasPosition(view.family, pos)) return refuse(400, 'This head has no such valve position.', { pos: 'Unknown valve position.' });
	const key = posKey(pos);
	const suggestion = view.suggestions.get(key)!;
	const warning = seatCutWarning(d.kind, suggestion.guide);
	if (warning && !d.acknowledge) return { ok: false as const, code: 409 as const, message: warning, errors: { [key]: warning }, warning: { pos: key, text: warning } };
	const note = warning ? [d.note, `Seat cut recorded with the guide ${suggestion.guide === 'out' ? 'out of limits' : 'worn past the rework size'} (acknowledged).`].filter(Boolean).join(' ') : d.note;
	const before = view.decisions.get(key) ?? null;
	if (before && before.kind === d.kind && before.note === note) return { ok: true as const, changed: false };
	const row = await upsertDecision(tx, { shopId, headId, ...pos, suggested: suggestion.kind, rule: suggestion.rule, kind: d.kind, note, decidedBy: who.userId });
	await audit(tx, shopId, who, {
		entity: 'decision',
		entityId: row.id,
		action: before ? 'update' : 'create',
		before: before ? { kind: before.kind, note: before.note } : undefined,
		after: { head: head.serial, position: posLabel(pos, view.family), suggested: suggestion.kind, kind: d.kind, note, overridesSuggestion: suggestion.kind !== null && suggestion.kind !== d.kind }
	});
	// With every position decided, the head goes to rework.
	const decided = new Set([...view.decisions.keys(), key]);
	if (head.status === 'inspected' && view.positions.every((p) => decided.has(posKey(p)))) {
		await setHeadStatus(tx, shopId, headId, 'in_rework');
		await audit(tx, shopId, who, { entity: 'head', entityId: headId, action: 'update', before: { status: head.status }, after: { status: 'in_rework' } });
	}
	return { ok: true as const, changed: true };
}

// ---------------------------------------------------------------------------------------------
// Release

export async function releaseHead(tx: Tx, shopId: string, who: Who, headId: string, r: { override: boolean; reason: string; isOwner: boolean }) {
	const head = await headRow(tx, shopId, headId, { lock: true });
	if (!head) return refuse(404, 'No such head in this shop.');
	if (head.status === 'released') return refuse(409, `Head ${head.serial} was already released on ${head.releasedOn}.`);
	const view = await loadHeadView(tx, shopId, headId);
	if (!view) return refuse(404, 'No such head in this shop.');
	const blockers: ReleaseBlocker[] = releaseBlockers(view);
	if (blockers.length && !r.override) {
		return { ok: false as const, code: 409 as const, message: `Head ${head.serial} cannot be released: ${blockers.length} valve position${blockers.length === 1 ? '' : 's'} fail${blockers.length === 1 ? 's' : ''} a final check.`, errors: {}, blockers };
	}
	if (r.override && blockers.length) {
		if (!r.isOwner) return { ok: false as const, code: 403 as const, message: 'Only an owner can release a head over a failing check.', errors: {} };
		if (r.reason.trim().length < 10) return refuse(400, 'Write why the head goes out anyway (10 characters at least).', { reason: 'Write why the head goes out anyway (10 characters at least).' });
	}
	const on = today() < head.receivedOn ? head.receivedOn : today();
	const overrideReason = r.override && blockers.length ? r.reason.trim() : null;
	await markReleased(tx, shopId, headId, { releasedOn: on, releasedBy: who.userId, overrideReason });
	await audit(tx, shopId, who, { entity: 'head', entityId: headId, action: 'update', before: { status: head.status }, after: { status: 'released', releasedOn: on } });
	if (overrideReason) {
		await audit(tx, shopId, who, {
			entity: 'head',
			entityId: headId,
			action: 'override',
			before: { blockers: blockers.map((b) => ({ position: posLabel(b.pos, view.family), reasons: b.reasons })) },
			after: { released: true, reason: overrideReason }
		});
	}
	return { ok: true as const, releasedOn: on, overridden: overrideReason !== null };
}

// ---------------------------------------------------------------------------------------------
// Comebacks

export async function recordComeback(
	tx: Tx,
	shopId: string,
	who: Who,
	originalId: string,
	d: { returnedOn: string; usageUnit: 'km' | 'mi' | 'h'; usage: number | null; whatFailed: string; positions: string[] }
) {
	const original = await headRow(tx, shopId, originalId, { lock: true });
	if (!original) return refuse(404, 'No such head in this shop.');
	if (original.status !== 'released' || !original.releasedOn) return refuse(409, `Head ${original.serial} has not been released yet; a comeback is recorded against a released head.`);
	const family = await familyById(tx, shopId, original.familyId);
	if (!family) return refuse(404, 'The head’s engine family is missing.');
	const errors: Record<string, string> = {};
	if (d.returnedOn < original.releasedOn) errors.returnedOn = `The head was released on ${original.releasedOn}; it cannot come back before that.`;
	if (d.returnedOn > today()) errors.returnedOn = 'A comeback cannot be dated in the future.';
	const mileageKm = d.usage !== null && d.usageUnit !== 'h' ? distanceToKm(d.usage, d.usageUnit) : null;
	if (mileageKm !== null && original.mileageKm !== null && mileageKm < original.mileageKm) {
		errors.usage = `The head left at ${original.mileageKm.toLocaleString('en-US')} km; the comeback mileage cannot be lower.`;
	}
	const positions: Position[] = [];
	for (const k of new Set(d.positions)) {
		const p = parsePosKey(k);
		if (!p || !hasPosition(family, p)) errors.positions = 'Choose valve positions of this head.';
		else positions.push(p);
	}
	if (Object.keys(errors).length) return refuse(400, 'The comeback was not saved: correct the fields marked.', errors);
	const serial = await nextComebackSerial(tx, shopId, original.serial);
	const head = await insertHead(tx, {
		shopId,
		familyId: original.familyId,
		serial,
		customer: original.customer,
		customerEmail: original.customerEmail,
		receivedOn: d.returnedOn,
		mileageKm,
		engineHours: d.usage !== null && d.usageUnit === 'h' ? Math.round(d.usage) : null,
		complaint: `Comeback: ${d.whatFailed}`.slice(0, 2000),
		status: 'received',
		comebackOf: original.id
	});
	const cb = await insertComeback(tx, { shopId, headId: head.id, originalHeadId: original.id, whatFailed: d.whatFailed, positions, recordedBy: who.userId });
	await audit(tx, shopId, who, {
		entity: 'comeback',
		entityId: cb.id,
		action: 'create',
		after: { original: original.serial, comeback: serial, returnedOn: d.returnedOn, mileageKm, whatFailed: d.whatFailed, positions: positions.map((p) => posLabel(p, family)) }
	});
	return { ok: true as const, head };
}

// ---------------------------------------------------------------------------------------------
// What the pages call

/** A refusal of the functions above as the one error type (its extra fields as details). */
export function unlessRefused<R extends { ok: boolean }>(r: R): Exclude<R, { ok: false }> {
	if (r.ok) return r as Exclude<R, { ok: false }>;
	const { ok: _ok, code, message, errors, ...details } = r as unknown as Refusal & Record<string, unknown>;
	throw new DomainError(code, message, errors, details);
}

/** One page of the head list (sorted, filtered and paged in SQL) and the families to filter by. */
export function headsPage(shopId: string, filter: Omit<HeadFilter, 'pageSize'>, pageSize: number) {
	return inShop(shopId, async (tx) => {
		const { rows, total } = await listHeads(tx, shopId, { ...filter, pageSize });
		const families = await listFamilies(tx, shopId);
		return { rows, total, families: families.map((f) => ({ id: f.id, code: f.code })) };
	});
}

/** What the intake form offers: the families, the customers known and their latest e-mail. */
export function intakeChoices(shopId: string) {
	return inShop(shopId, async (tx) => ({
		families: (await listFamilies(tx, shopId)).map((f) => ({ id: f.id, code: f.code, description: f.description, cylinders: f.cylinders })),
		customers: await customersOf(tx, shopId),
		emails: await customerEmails(tx, shopId)
	}));
}

function violates(e: unknown, constraint: string): boolean {
	const cause = ((e as { cause?: unknown })?.cause ?? e) as { code?: string; constraint_name?: string };
	return cause?.code === '23505' && cause.constraint_name === constraint;
}

/** Takes a head in; the new head row. */
export async function takeInHead(shopId: string, who: Who, d: IntakeData) {
	try {
		return unlessRefused(await inShop(shopId, (tx) => intakeHead(tx, shopId, who, d))).head;
	} catch (e) {
		// Two people taking in the same serial at the same moment: the second is told so.
		if (violates(e, 'heads_shop_serial_key')) throw conflict('The head was not saved.', { serial: `Head ${d.serial} was just taken in by someone else.` });
		throw e;
	}
}

/** Records one position's decision; whether anything changed. A seat cut over a bad guide is
 * refused (409) until acknowledged, with the warning in the details. */
export async function decide(shopId: string, who: Who, headId: string, d: Parameters<typeof recordDecision>[4]) {
	return unlessRefused(await inShop(shopId, (tx) => recordDecision(tx, shopId, who, headId, d))).changed;
}

/**
 * Confirms the suggested decision of every position that has one and no decision yet. A refusal
 * stops the loop and is returned, not thrown: the decisions recorded before it stay.
 */
export function acceptSuggestions(shopId: string, who: Who, headId: string) {
	return inShop(shopId, async (tx) => {
		const view = await viewOrRefuse(tx, shopId, headId);
		let n = 0;
		for (const p of view.positions) {
			const key = posKey(p);
			const s = view.suggestions.get(key);
			if (view.decisions.has(key) || !s?.kind) continue;
			const r = await recordDecision(tx, shopId, who, headId, { pos: key, kind: s.kind, note: '', acknowledge: false });
			if (!r.ok) return { ok: false as const, code: r.code, pos: key, message: `${posLabel(p, view.family)}: ${r.message}` };
			n++;
		}
		return { ok: true as const, accepted: n };
	});
}

/** Releases a head (over failing checks only for an owner, with a reason). */
export async function release(shopId: string, who: Who, headId: string, r: Parameters<typeof releaseHead>[4]) {
	return unlessRefused(await inShop(shopId, (tx) => releaseHead(tx, shopId, who, headId, r)));
}

/** Records a comeback of a released head; the new comeback job. */
export async function registerComeback(shopId: string, who: Who, originalId: string, d: Parameters<typeof recordComeback>[4]) {
	return unlessRefused(await inShop(shopId, (tx) => recordComeback(tx, shopId, who, originalId, d))).head;
}
