// Suggestions for the mapping step: for each header Lapmark does not understand, the target
// name it most resembles (edit distance on normalised names, by fastest-levenshtein), plus a few
// words shops commonly use for the identity columns.
import { distance } from 'fastest-levenshtein';
import { normaliseHeader, planHeader, targetNames, type Layout } from './header';

const SYNONYMS: Record<string, string[]> = {
	head_serial: ['serial', 'serial_no', 'serial_number', 'casting', 'casting_number', 'head', 'head_no', 'job'],
	family: ['engine', 'engine_family', 'model', 'type'],
	stage: ['phase', 'step', 'inspection'],
	cylinder: ['cyl', 'cyl_no', 'cylinder_no', 'hole'],
	side: ['port', 'in_ex', 'intake_exhaust', 'valve_type'],
	valve: ['valve_no', 'valve_index', 'index', 'position'],
	measured_at: ['date', 'time', 'timestamp', 'measured', 'when', 'date_time'],
	measured_by: ['inspector', 'machinist', 'operator', 'tech', 'technician', 'by', 'who'],
	instrument: ['gauge', 'gage', 'tool'],
	mileage: ['km', 'odometer', 'kilometres', 'kilometers'],
	customer: ['client', 'owner', 'account'],
	value: ['reading', 'result'],
	measurement: ['quantity', 'check', 'parameter'],
	unit: ['units', 'uom']
};

export interface HeaderAdvice {
	layout: Layout;
	ok: boolean;
	errors: string[];
	unmatched: string[];
	suggestions: Record<string, string>;
	targets: string[];
}

export function suggestTarget(header: string, targets: string[]): string {
	const n = normaliseHeader(header);
	for (const [target, words] of Object.entries(SYNONYMS)) {
		if (targets.includes(target) && words.includes(n)) return target;
	}
	let best = 'ignore';
	let bestScore = 0.45; // below this similarity, suggest ignoring rather than guessing
	for (const t of targets) {
		const score = 1 - distance(n, t) / Math.max(n.length, t.length);
		if (score > bestScore) {
			best = t;
			bestScore = score;
		}
	}
	return best;
}

export function adviseHeaders(headers: string[], layout?: Layout, remembered?: Record<string, string> | null): HeaderAdvice {
	const first = planHeader(headers, layout, remembered ?? {});
	const lay = first.ok ? first.plan.layout : first.layout;
	const targets = targetNames(lay);
	const suggestions: Record<string, string> = { ...(remembered ?? {}) };
	if (!first.ok) for (const h of first.unmatched) suggestions[h] ??= suggestTarget(h, targets);
	return { layout: lay, ok: first.ok, errors: first.ok ? [] : first.errors, unmatched: first.ok ? [] : first.unmatched, suggestions, targets };
}
