// Reading a CSV's header: which layout, which column holds what, which unit each measurement
// column is in. Headers that do not match are mapped by a person (the mapping step) and the
// mapping is remembered per shop for the next file with the same headers.
import { isMeasurement, isUnit, unitFits, MEASUREMENTS, type Measurement, type Unit } from '$lib/measurements';

export type Layout = 'wide' | 'long';

export const IDENTITY = ['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'measured_by'] as const;
export const OPTIONAL = ['instrument', 'mileage', 'customer'] as const;
export const LONG_ONLY = ['measurement', 'value', 'unit'] as const;
export type FieldName = (typeof IDENTITY)[number] | (typeof OPTIONAL)[number] | (typeof LONG_ONLY)[number];

/** The names a column may be mapped to: fields, wide measurement columns, or `ignore`. */
export function targetNames(layout: Layout): string[] {
	const names: string[] = [...IDENTITY, ...OPTIONAL];
	if (layout === 'long') names.push(...LONG_ONLY);
	else for (const m of MEASUREMENTS) for (const u of unitsFor(m)) names.push(`${m}_${u}`);
	return names;
}

function unitsFor(m: Measurement): Unit[] {
	return (['mm', 'in', 'um', 'uin', 'pct', 's'] as Unit[]).filter((u) => unitFits(m, u));
}

export interface MeasureColumn {
	index: number;
	measurement: Measurement;
	unit: Unit;
	header: string;
}

export interface HeaderPlan {
	layout: Layout;
	fields: Partial<Record<FieldName, number>>;
	measures: MeasureColumn[];
	ignored: number[];
	headers: string[];
}

export type HeaderResult =
	| { ok: true; plan: HeaderPlan }
	| { ok: false; errors: string[]; unmatched: string[]; headers: string[]; layout: Layout };

export const MAX_COLUMNS = 200;

export function normaliseHeader(h: string): string {
	return h
		.replace(/^\uFEFF/, '')
		.trim()
		.toLowerCase()
		.replace(/µ/g, 'u')
		.replace(/[\s\-./()]+/g, '_')
		.replace(/_+/g, '_')
		.replace(/^_|_$/g, '');
}

/** `clearance_mm` → clearance in mm; `roughness_ra_uin` → roughness_ra in µin. */
export function parseMeasureHeader(name: string): { measurement: Measurement; unit: Unit } | { problem: string } | null {
	const m = /^(.+)_([a-z]+)$/.exec(name);
	if (!m) return null;
	const [, key, unit] = m;
	if (!isMeasurement(key)) return null;
	if (!isUnit(unit)) return { problem: `column "${name}": unknown unit "${unit}" (use mm, in, um, uin, pct or s)` };
	if (!unitFits(key, unit)) return { problem: `column "${name}": ${key} cannot be given in ${unit} (use ${unitsFor(key).join(' or ')})` };
	return { measurement: key, unit };
}

export function detectLayout(names: string[]): Layout {
	return names.includes('measurement') && names.includes('value') ? 'long' : 'wide';
}

/**
 * Plan the columns. `mapping` maps an original header (as written in the file) to a target
 * name or `ignore`; without it only exact (normalised) names are understood.
 */
export function planHeader(raw: string[], layout?: Layout, mapping: Record<string, string> = {}): HeaderResult {
	const headers = raw.map((h) => h.replace(/^\uFEFF/, '').trim());
	const names = headers.map((h) => (mapping[h] !== undefined ? mapping[h] : normaliseHeader(h)));
	const lay = layout ?? detectLayout(names);
	const errors: string[] = [];
	const unmatched: string[] = [];
	if (headers.length > MAX_COLUMNS) {
		return { ok: false, errors: [`The file has ${headers.length} columns; Lapmark reads at most ${MAX_COLUMNS}.`], unmatched: [], headers: headers.slice(0, MAX_COLUMNS), layout: lay };
	}
	const fields: Partial<Record<FieldName, number>> = {};
	const measures: MeasureColumn[] = [];
	const ignored: number[] = [];
	const known = new Set<string>([...IDENTITY, ...OPTIONAL, ...(lay === 'long' ? LONG_ONLY : [])]);
	names.forEach((name, i) => {
		if (name === 'ignore') {
			ignored.push(i);
			return;
		}
		if (name === '') {
			errors.push(`Column ${i + 1} has no name.`);
			unmatched.push(headers[i]);
			return;
		}
		if (known.has(name)) {
			if (fields[name as FieldName] !== undefined) errors.push(`Two columns are "${name}".`);
			fields[name as FieldName] = i;
			return;
		}
		if (lay === 'wide') {
			const mh = parseMeasureHeader(name);
			if (mh && 'problem' in mh) {
				errors.push(mh.problem);
				unmatched.push(headers[i]);
				return;
			}
			if (mh) {
				if (measures.some((c) => c.measurement === mh.measurement)) errors.push(`Two columns hold ${mh.measurement}.`);
				measures.push({ index: i, ...mh, header: headers[i] });
				return;
			}
		}
		unmatched.push(headers[i]);
	});
	if (unmatched.length) {
		errors.push(`Columns not understood: ${unmatched.map((u) => `"${u}"`).join(', ')}. Map them to Lapmark's names or mark them to be ignored.`);
	}
	const required: readonly string[] = lay === 'long' ? [...IDENTITY, ...LONG_ONLY] : IDENTITY;
	const missing = required.filter((f) => fields[f as FieldName] === undefined);
	if (missing.length) errors.push(`Missing columns: ${missing.join(', ')}.`);
	if (lay === 'wide' && measures.length === 0 && !missing.length) {
		errors.push('No measurement columns: name them like clearance_mm, guide_bore_in or roughness_ra_uin.');
	}
	if (errors.length) return { ok: false, errors, unmatched, headers, layout: lay };
	return { ok: true, plan: { layout: lay, fields, measures, ignored, headers } };
}

/** A stable key for a header row, to remember its mapping. */
export function headerSignature(headers: string[]): string {
	return headers.map((h) => h.replace(/^\uFEFF/, '').trim()).join('\u001f');
}
