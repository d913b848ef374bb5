// Checking one CSV row. A row with any invalid value is rejected whole, with every reason.
import {
	MEASUREMENT_INFO,
	isMeasurement,
	isUnit,
	parseSide,
	parseStage,
	toCanonical,
	unitFits,
	type Measurement,
	type Side,
	type Stage,
	type Unit
} from '$lib/measurements';
import type { HeaderPlan } from './header';

export interface FamilyLayout {
	id: string;
	code: string;
	cylinders: number;
	intakeValves: number;
	exhaustValves: number;
}

export interface RowContext {
	/** Family codes as the shop wrote them, matched without regard to case. */
	families: Map<string, FamilyLayout>;
	/** Instruments by lower-cased name or serial. */
	instruments: Map<string, string>;
	decimalComma: boolean;
	/** Readings dated later than this are refused (now, plus a few minutes of clock drift). */
	latest: number;
}

export interface GoodRow {
	serial: string;
	family: FamilyLayout;
	stage: Stage;
	cylinder: number;
	side: Side;
	valve: number;
	measuredAt: string;
	measuredBy: string;
	instrumentId: string | null;
	mileageKm: number | null;
	customer: string | null;
	readings: { measurement: Measurement; value: number }[];
}

export type RowResult = { ok: true; row: GoodRow } | { ok: false; reason: string };

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export function parseNumber(text: string, decimalComma: boolean): number | null {
	let t = text.trim();
	if (decimalComma && /^[^.]*,[^,]*$/.test(t)) t = t.replace(',', '.');
	if (!NUMBER.test(t)) return null;
	const n = Number(t);
	return Number.isFinite(n) ? n : null;
}

const DATE = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,6}))?)?(Z|[+-]\d{2}:?\d{2})?)?$/i;

/** ISO 8601 date or date-time; a time without a zone is taken as UTC. Returns epoch ms. */
export function parseTimestamp(text: string): number | null {
	const m = DATE.exec(text.trim());
	if (!m) return null;
	const [, y, mo, d, h = '00', mi = '00', s = '00', frac = '0', zone] = m;
	const month = Number(mo);
	const day = Number(d);
	if (month < 1 || month > 12 || day < 1 || day > 31 || Number(h) > 23 || Number(mi) > 59 || Number(s) > 59) return null;
	let ms = Date.UTC(Number(y), month - 1, day, Number(h), Number(mi), Number(s), Math.round(Number(`0.${frac}`) * 1000));
	const back = new Date(ms);
	if (back.getUTCDate() !== day || back.getUTCMonth() !== month - 1) return null; // 2026-02-30
	if (zone && zone.toUpperCase() !== 'Z') {
		const sign = zone.startsWith('-') ? -1 : 1;
		const digits = zone.slice(1).replace(':', '');
		ms -= sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2))) * 60_000;
	}
	return ms;
}

const EARLIEST = Date.UTC(1950, 0, 1);

// The rows of one head usually share their time: the last text read is remembered with what it
// reads as (a pure function of the text, so any number of imports may share it).
let lastAtText: string | null = null;
let lastAt: number | null = null;
let lastIso = '';

function readTimestamp(text: string) {
	if (text !== lastAtText) {
		lastAtText = text;
		lastAt = parseTimestamp(text);
		lastIso = lastAt === null ? '' : new Date(lastAt).toISOString();
	}
	return { at: lastAt, iso: lastIso };
}

function checkValue(measurement: Measurement, raw: number, unit: Unit, column: string): { value: number } | { reason: string } {
	const info = MEASUREMENT_INFO[measurement];
	if (raw < 0) return { reason: `${column}: negative value ${raw}` };
	const value = toCanonical(raw, unit);
	if (value > info.max) {
		return { reason: `${column}: ${raw} ${unit} is not physically possible for ${info.label.toLowerCase()} (at most ${info.max} ${info.unit === 'pct' ? '%' : info.unit})` };
	}
	if ((measurement === 'stem_diameter' || measurement === 'guide_bore') && value < 1) {
		return { reason: `${column}: ${raw} ${unit} is too small for a ${info.label.toLowerCase()}` };
	}
	return { value };
}

export function checkRow(cells: string[], plan: HeaderPlan, ctx: RowContext): RowResult {
	const reasons: string[] = [];
	if (cells.length !== plan.headers.length) {
		return { ok: false, reason: `expected ${plan.headers.length} fields, found ${cells.length}` };
	}
	const f = plan.fields;
	const cell = (i: number | undefined) => (i === undefined ? '' : (cells[i] ?? '').trim());

	const serial = cell(f.head_serial);
	if (!serial) reasons.push('head_serial is empty');
	else if (serial.length > 64) reasons.push('head_serial is longer than 64 characters');

	const familyText = cell(f.family);
	const family = ctx.families.get(familyText.toLowerCase());
	if (!familyText) reasons.push('family is empty');
	else if (!family) reasons.push(`unknown family "${familyText}"`);

	const stage = parseStage(cell(f.stage));
	if (!stage) reasons.push(`stage "${cell(f.stage)}" is not as_received or final`);

	const side = parseSide(cell(f.side));
	if (!side) reasons.push(`side "${cell(f.side)}" is not intake or exhaust`);

	const cylinder = /^\d{1,3}$/.test(cell(f.cylinder)) ? Number(cell(f.cylinder)) : null;
	if (cylinder === null) reasons.push(`cylinder "${cell(f.cylinder)}" is not a whole number`);
	else if (family && (cylinder < 1 || cylinder > family.cylinders)) {
		reasons.push(`cylinder ${cylinder} is outside ${family.code} (cylinders 1–${family.cylinders})`);
	}

	const valve = /^\d{1,2}$/.test(cell(f.valve)) ? Number(cell(f.valve)) : null;
	if (valve === null) reasons.push(`valve "${cell(f.valve)}" is not a whole number`);
	else if (family && side) {
		const most = side === 'intake' ? family.intakeValves : family.exhaustValves;
		if (valve < 1 || valve > most) reasons.push(`${side} valve ${valve} is outside ${family.code} (${side} valves 1–${most})`);
	}

	const atText = cell(f.measured_at);
	const { at, iso } = readTimestamp(atText);
	if (at === null) reasons.push(`measured_at "${atText}" is not a date (use 2026-03-14 or 2026-03-14T09:30:00Z)`);
	else if (at > ctx.latest) reasons.push(`measured_at ${atText} is in the future`);
	else if (at < EARLIEST) reasons.push(`measured_at ${atText} is before 1950`);

	const measuredBy = cell(f.measured_by);
	if (!measuredBy) reasons.push('measured_by is empty');
	else if (measuredBy.length > 120) reasons.push('measured_by is longer than 120 characters');

	let instrumentId: string | null = null;
	const instrumentText = cell(f.instrument);
	if (instrumentText) {
		instrumentId = ctx.instruments.get(instrumentText.toLowerCase()) ?? null;
		if (!instrumentId) reasons.push(`unknown instrument "${instrumentText}"`);
	}

	let mileageKm: number | null = null;
	const mileageText = cell(f.mileage);
	if (mileageText) {
		const n = parseNumber(mileageText, ctx.decimalComma);
		if (n === null || !Number.isInteger(n) || n < 0 || n > 5_000_000) reasons.push(`mileage "${mileageText}" is not a whole number of km between 0 and 5,000,000`);
		else mileageKm = n;
	}
	const customer = cell(f.customer) || null;
	if (customer && customer.length > 200) reasons.push('customer is longer than 200 characters');

	const readings: GoodRow['readings'] = [];
	if (plan.layout === 'wide') {
		for (const col of plan.measures) {
			const text = (cells[col.index] ?? '').trim();
			if (text === '') continue; // not measured
			const n = parseNumber(text, ctx.decimalComma);
			if (n === null) {
				reasons.push(`${col.header}: "${text}" is not a number`);
				continue;
			}
			const checked = checkValue(col.measurement, n, col.unit, col.header);
			if ('reason' in checked) reasons.push(checked.reason);
			else readings.push({ measurement: col.measurement, value: checked.value });
		}
		if (!readings.length && !reasons.length) reasons.push('no measurement in this row');
	} else {
		const key = cell(f.measurement).toLowerCase();
		const unitText = cell(f.unit).toLowerCase().replace('µ', 'u');
		const text = cell(f.value);
		if (!isMeasurement(key)) reasons.push(`unknown measurement "${cell(f.measurement)}"`);
		else if (!isUnit(unitText)) reasons.push(`unknown unit "${cell(f.unit)}" (use mm, in, um, uin, pct or s)`);
		else if (!unitFits(key, unitText)) reasons.push(`unit ${unitText} does not fit ${key} (use ${MEASUREMENT_INFO[key].units.join(' or ')})`);
		const n = parseNumber(text, ctx.decimalComma);
		if (n === null) reasons.push(`value "${text}" is not a number`);
		else if (isMeasurement(key) && isUnit(unitText) && unitFits(key, unitText)) {
			const checked = checkValue(key, n, unitText, 'value');
			if ('reason' in checked) reasons.push(checked.reason);
			else readings.push({ measurement: key, value: checked.value });
		}
	}

	if (reasons.length) return { ok: false, reason: reasons.join('; ') };
	return {
		ok: true,
		row: {
			serial,
			family: family!,
			stage: stage!,
			cylinder: cylinder!,
			side: side!,
			valve: valve!,
			measuredAt: iso,
			measuredBy,
			instrumentId,
			mileageKm,
			customer,
			readings
		}
	};
}
