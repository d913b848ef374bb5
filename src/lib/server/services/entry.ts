// Saving what a person typed into the inspection grid: one cell or a whole grid, all checked
// before anything is written, in the head's own locked transaction, every change audited.
// Typed values are converted to canonical units here (exact factors, $lib/measurements); the
// guide bore and clearance readings are worked out from the raw bore cells and the stem.
import {
	isUnit,
	MEASUREMENT_INFO,
	parseDecimal,
	pressureToKpa,
	toCanonical,
	unitFits,
	vacuumHoldPercent,
	type Measurement,
	type Stage,
	type Unit
} from '$lib/measurements';
import {
	boreCellOf,
	boreGeometry,
	clearanceOf,
	hasPosition,
	parseField,
	parsePosKey,
	posLabel,
	typedFields,
	type BoreCellKey,
	type EntryField,
	type Position
} from '$lib/inspection';
import { inShop } from '../db';
import type { Tx } from '../db/scope';
import type { HeadStatus } from '../db/schema';
import { audit, type AuditWho } from '../queries/audit';
import { boreCells, cellReadings, deleteBore, deleteCellReadings, insertReading, updateReading, upsertBore } from '../queries/entry';
import { familyById } from '../queries/families';
import { headRow, setHeadStatus } from '../queries/heads';
import { instrumentById } from '../queries/instruments';
import { DomainError } from '../errors';

/** Vacuum hold is typed as a percentage, or as the held vacuum with the applied vacuum given once for the column. */
export const VACUUM_UNITS = ['pct', 'kPa', 'inHg'] as const;
export type VacuumUnit = (typeof VACUUM_UNITS)[number];

export interface EntryInput {
	cells: { pos: string; field: string; text: string }[];
	/** Unit per column: a measurement key, or "bore" for all the bore cells. */
	units: Record<string, string | undefined>;
	/** Gauge per column (same keys); empty for none. */
	instruments: Record<string, string | undefined>;
	/** The applied vacuum, in the vacuum column's unit, when that unit is a pressure. */
	appliedVacuum?: string;
}

export type EntryResult =
	| { ok: true; changed: number; status: HeadStatus }
	| { ok: false; code: 400 | 404 | 409; message: string; errors: Record<string, string> };

export interface Who extends AuditWho {
	userId: string;
	/** The name written into readings.measured_by. */
	name: string;
}

/** The grid column a field belongs to (its unit and gauge are chosen per column). */
export function columnOf(field: EntryField): string {
	return field.startsWith('bore:') ? 'bore' : field;
}

interface Planned {
	key: string;
	pos: Position;
	field: EntryField;
	/** Canonical value, or null to clear the cell. */
	value: number | null;
	typed: { text: string; unit: string; applied?: number };
	instrumentId: string | null;
}

export async function saveEntries(tx: Tx, shopId: string, who: Who, headId: string, stage: Stage, input: EntryInput): Promise<EntryResult> {
	const head = await headRow(tx, shopId, headId, { lock: true });
	if (!head) return { ok: false, code: 404, message: 'No such head in this shop.', errors: {} };
	if (head.status === 'released') {
		return { ok: false, code: 409, message: `Head ${head.serial} was released on ${head.releasedOn}; its readings are closed. Record a comeback to measure it again.`, errors: {} };
	}
	const family = await familyById(tx, shopId, head.familyId);
	if (!family) return { ok: false, code: 404, message: 'The head’s engine family is missing.', errors: {} };

	const errors: Record<string, string> = {};
	const allowed = new Set<string>(typedFields(stage));
	const columns = new Set<string>();
	const planned: Planned[] = [];
	if (input.cells.length === 0) return { ok: false, code: 400, message: 'Nothing to save.', errors: {} };
	if (input.cells.length > 2000) return { ok: false, code: 400, message: 'Too many values in one save (2000 at most).', errors: {} };

	// Units and gauges, per column, checked once.
	const unitOf = (column: string, m: Measurement): Unit | VacuumUnit | null => {
		const u = input.units[column] ?? (m === 'vacuum_hold' ? 'pct' : MEASUREMENT_INFO[m].units[0]);
		if (m === 'vacuum_hold') return (VACUUM_UNITS as readonly string[]).includes(u) ? (u as VacuumUnit) : null;
		return isUnit(u) && unitFits(m, u) ? u : null;
	};
	const gauges = new Map<string, string | null>();
	for (const cell of input.cells) {
		const field = parseField(cell.field);
		if (field) columns.add(columnOf(field));
	}
	for (const column of columns) {
		const id = (input.instruments[column] ?? '').trim();
		if (!id) {
			gauges.set(column, null);
			continue;
		}
		const ok = /^[0-9a-f-]{36}$/i.test(id) ? await instrumentById(tx, shopId, id) : null;
		if (!ok) errors[`gauge:${column}`] = 'Choose a gauge from this shop’s register.';
		else if (ok.retired) errors[`gauge:${column}`] = `${ok.name} is retired; choose a gauge in use.`;
		gauges.set(column, ok && !ok.retired ? ok.id : null);
	}
	let applied: number | null = null;

	for (const cell of input.cells) {
		const pos = parsePosKey(cell.pos);
		const field = parseField(cell.field);
		const key = `${cell.pos}|${cell.field}`;
		if (!pos || !field || !hasPosition(family, pos)) {
			errors[key] = 'This head has no such valve position.';
			continue;
		}
		if (!allowed.has(field)) {
			errors[key] = 'That measurement is not entered at this stage.';
			continue;
		}
		const m: Measurement = field.startsWith('bore:') ? 'guide_bore' : (field as Measurement);
		const column = columnOf(field);
		const unit = unitOf(column, m);
		if (!unit) {
			errors[`unit:${column}`] = `Choose a unit for ${MEASUREMENT_INFO[m].label.toLowerCase()}: ${m === 'vacuum_hold' ? 'pct, kPa, inHg' : MEASUREMENT_INFO[m].units.join(', ')}.`;
			continue;
		}
		const text = cell.text.trim();
		if (text === '') {
			planned.push({ key, pos, field, value: null, typed: { text: '', unit }, instrumentId: gauges.get(column) ?? null });
			continue;
		}
		const n = parseDecimal(text);
		if (n === null) {
			errors[key] = `“${text.slice(0, 20)}” is not a number. Type digits with one decimal point, e.g. 0.3125.`;
			continue;
		}
		let value: number;
		let typed: Planned['typed'] = { text, unit };
		if (m === 'vacuum_hold' && unit !== 'pct') {
			if (applied === null) {
				const a = parseDecimal(input.appliedVacuum ?? '');
				if (a === null || !(a > 0)) {
					errors.applied = `Type the applied vacuum in ${unit} for this column.`;
					continue;
				}
				applied = a;
			}
			if (n > applied) {
				errors[key] = `The held vacuum (${n} ${unit}) cannot exceed the applied vacuum (${applied} ${unit}).`;
				continue;
			}
			value = vacuumHoldPercent(pressureToKpa(applied, unit as 'kPa' | 'inHg'), pressureToKpa(n, unit as 'kPa' | 'inHg'));
			typed = { text, unit, applied };
		} else {
			value = toCanonical(n, unit as Unit);
		}
		const info = MEASUREMENT_INFO[m];
		const lo = m === 'stem_diameter' || m === 'guide_bore' ? 1 : 0;
		if (value < lo || value > info.max) {
			errors[key] = `${info.label} must be between ${lo} and ${info.max} ${info.unit === 'um' ? 'µm' : info.unit === 'pct' ? '%' : info.unit}; ${text} ${unit} is ${value} — check the unit.`;
			continue;
		}
		if (m === 'fluid_hold' && !Number.isInteger(value)) {
			errors[key] = 'Fluid hold is whole seconds to the first drip.';
			continue;
		}
		planned.push({ key, pos, field, value, typed, instrumentId: gauges.get(column) ?? null });
	}
	if (Object.keys(errors).length) return { ok: false, code: 400, message: 'Nothing was saved: correct the values marked.', errors };

	// Apply. The same timestamp for the whole save: one moment of measuring.
	const now = new Date();
	let changed = 0;
	const recompute = new Map<string, { pos: Position; boreGauge: string | null | undefined }>();
	for (const p of planned) {
		const where = { shopId, headId, stage, ...p.pos };
		const label = `${posLabel(p.pos, family)}`;
		const bore = boreCellOf(p.field);
		if (bore) {
			const existing = (await boreCells(tx, where)).find((b) => b.direction === bore.direction && b.height === bore.height);
			if (p.value === null) {
				if (!existing) continue;
				await deleteBore(tx, where, bore.direction, bore.height);
				await audit(tx, shopId, who, { entity: 'bore_reading', entityId: existing.id, action: 'delete', before: { head: head.serial, stage, position: label, ...bore, valueMm: existing.valueMm } });
			} else {
				if (existing && existing.valueMm === p.value && existing.instrumentId === p.instrumentId) continue;
				const row = await upsertBore(tx, { ...where, ...bore, valueMm: p.value, measuredAt: now, measuredBy: who.name, instrumentId: p.instrumentId, enteredBy: who.userId });
				await audit(tx, shopId, who, {
					entity: 'bore_reading',
					entityId: row.id,
					action: existing ? 'update' : 'create',
					before: existing ? { valueMm: existing.valueMm } : undefined,
					after: { head: head.serial, stage, position: label, ...bore, valueMm: p.value, typed: p.typed }
				});
			}
			changed++;
			recompute.set(posKeyOf(p.pos), { pos: p.pos, boreGauge: p.instrumentId });
			continue;
		}
		const m = p.field as Measurement;
		const did = await writeReading(tx, shopId, who, head.serial, label, { ...where, familyId: head.familyId }, m, p.value, p.instrumentId, now, p.typed);
		if (did) {
			changed++;
			if (m === 'stem_diameter') {
				const r = recompute.get(posKeyOf(p.pos));
				recompute.set(posKeyOf(p.pos), { pos: p.pos, boreGauge: r?.boreGauge });
			}
		}
	}

	// Guide bore (largest) and clearance (largest − stem) follow from the cells.
	for (const { pos, boreGauge } of recompute.values()) {
		const where = { shopId, headId, stage, ...pos };
		const cells = await boreCells(tx, where);
		const geometry = boreGeometry(Object.fromEntries(cells.map((c) => [`${c.direction}:${c.height}` as BoreCellKey, c.valueMm])));
		const [stem] = await cellReadings(tx, where, 'stem_diameter');
		const label = posLabel(pos, family);
		const gauge = boreGauge !== undefined ? boreGauge : (cells.find((c) => c.instrumentId)?.instrumentId ?? null);
		if (cells.length === 0) {
			// The bore cells were cleared: so are the values worked out from them. A guide bore
			// or clearance that came from an import stays as it is.
			for (const m of ['guide_bore', 'clearance'] as const) {
				const [cur] = await cellReadings(tx, where, m);
				if (cur && cur.batchId === null) await writeReading(tx, shopId, who, head.serial, label, { ...where, familyId: head.familyId }, m, null, null, now, null);
			}
			continue;
		}
		const clearance = clearanceOf(geometry.largest, stem?.value);
		if (clearance !== null && (clearance < 0 || clearance > MEASUREMENT_INFO.clearance.max)) {
			throw new EntryRefused(
				`${label}: the largest bore ${geometry.largest!.toFixed(4)} mm minus the stem ${stem!.value.toFixed(4)} mm gives a clearance of ${clearance.toFixed(4)} mm, which cannot be right. Check the bore and stem values.`,
				{ [`${posKeyOf(pos)}|stem_diameter`]: 'Check against the bore readings.' }
			);
		}
		const derived = { ...where, familyId: head.familyId };
		await writeReading(tx, shopId, who, head.serial, label, derived, 'guide_bore', geometry.largest, gauge, now, { derived: 'largest bore reading' });
		await writeReading(tx, shopId, who, head.serial, label, derived, 'clearance', clearance, gauge, now, { derived: 'largest bore − stem' });
	}

	// The head moves along when readings arrive.
	let status = head.status;
	const next: HeadStatus | null =
		stage === 'as_received' && head.status === 'received' ? 'inspected' : stage === 'final' && ['received', 'inspected', 'in_rework'].includes(head.status) ? 'final_check' : null;
	if (next && changed > 0) {
		await setHeadStatus(tx, shopId, headId, next);
		await audit(tx, shopId, who, { entity: 'head', entityId: headId, action: 'update', before: { status: head.status }, after: { status: next } });
		status = next;
	}
	return { ok: true, changed, status };
}

/** What the grid's save action calls: saveEntries in the shop's scope. A refusal is thrown as a
 * DomainError (EntryRefused when a value was wrong: nothing of the save is written). */
export async function saveGridEntries(shopId: string, who: Who, headId: string, stage: Stage, input: EntryInput) {
	const r = await inShop(shopId, (tx) => saveEntries(tx, shopId, who, headId, stage, input));
	if (!r.ok) throw new DomainError(r.code, r.message, r.errors);
	return r;
}

/** Thrown inside the transaction to roll back everything written so far. */
export class EntryRefused extends DomainError {
	constructor(message: string, errors: Record<string, string>) {
		super(400, message, errors);
		this.name = 'EntryRefused';
	}
	get errors() {
		return this.fields;
	}
}

function posKeyOf(p: Position) {
	return `${p.cylinder}-${p.side}-${p.valve}`;
}

/**
 * Sets one cell's current value: corrects the hand-entered current reading in place, adds a
 * newer one over an imported reading (the import's own rows stay, so undoing it stays exact),
 * or deletes the cell's readings when the value is cleared. False when nothing changed.
 */
async function writeReading(
	tx: Tx,
	shopId: string,
	who: Who,
	serial: string,
	label: string,
	where: { shopId: string; headId: string; familyId: string; stage: Stage; cylinder: number; side: Position['side']; valve: number },
	m: Measurement,
	value: number | null,
	instrumentId: string | null,
	now: Date,
	typed: unknown
): Promise<boolean> {
	const [current] = await cellReadings(tx, where, m);
	const what = { head: serial, stage: where.stage, position: label, measurement: m };
	if (value === null) {
		if (!current) return false;
		const gone = await deleteCellReadings(tx, where, m);
		for (const r of gone) await audit(tx, shopId, who, { entity: 'reading', entityId: String(r.id), action: 'delete', before: { ...what, value: r.value, measuredBy: r.measuredBy } });
		return true;
	}
	if (current && current.value === value && current.instrumentId === instrumentId) return false;
	if (current && current.batchId === null) {
		await updateReading(tx, shopId, current.id, { value, measuredAt: now, measuredBy: who.name, instrumentId });
		await audit(tx, shopId, who, { entity: 'reading', entityId: String(current.id), action: 'update', before: { value: current.value, measuredBy: current.measuredBy }, after: { ...what, value, typed } });
		return true;
	}
	const row = await insertReading(tx, { ...where, measurement: m, value, measuredAt: now, measuredBy: who.name, instrumentId });
	await audit(tx, shopId, who, { entity: 'reading', entityId: String(row.id), action: 'create', before: current ? { value: current.value, fromImport: true } : undefined, after: { ...what, value, typed } });
	return true;
}
