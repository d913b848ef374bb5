import { describe, expect, it } from 'vitest';
import { planHeader, MAX_COLUMNS, type HeaderPlan } from './header';
import { checkRow, parseNumber, parseTimestamp, type RowContext } from './rows';

const WIDE = ['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'measured_by', 'clearance_mm', 'guide_bore_in', 'roughness_ra_uin', 'vacuum_hold_pct'];
const fam = { id: '00000000-0000-4000-8000-000000000001', code: 'OAK-4', cylinders: 4, intakeValves: 2, exhaustValves: 1 };
const ctx: RowContext = {
	families: new Map([['oak-4', fam]]),
	instruments: new Map([['mic-1', '00000000-0000-4000-8000-00000000000a']]),
	decimalComma: false,
	latest: Date.UTC(2026, 11, 1, 12)
};

function plan(headers: string[], layout?: 'wide' | 'long'): HeaderPlan {
	const r = planHeader(headers, layout);
	if (!r.ok) throw new Error(r.errors.join(' '));
	return r.plan;
}

describe('header', () => {
	it('reads a wide header with units per column', () => {
		const p = plan(WIDE);
		expect(p.layout).toBe('wide');
		expect(p.measures.map((m) => `${m.measurement}:${m.unit}`)).toEqual(['clearance:mm', 'guide_bore:in', 'roughness_ra:uin', 'vacuum_hold:pct']);
	});

	it('detects the long layout', () => {
		const p = plan(['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'unit', 'measured_at', 'measured_by']);
		expect(p.layout).toBe('long');
	});

	it('normalises case, spaces and a byte order mark', () => {
		const p = plan(['\uFEFFHead Serial', 'Family', 'Stage', 'Cylinder', 'Side', 'Valve', 'Measured At', 'Measured By', 'Clearance (mm)']);
		expect(p.measures[0].measurement).toBe('clearance');
	});

	it('names columns it does not understand, and missing ones', () => {
		const r = planHeader(['serial no', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'measured_by', 'clearance_mm']);
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(r.unmatched).toEqual(['serial no']);
			expect(r.errors.join(' ')).toMatch(/Missing columns: head_serial/);
		}
	});

	it('applies a mapping, including columns to ignore', () => {
		const r = planHeader(['serial no', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'measured_by', 'clearance_mm', 'notes'], undefined, {
			'serial no': 'head_serial',
			notes: 'ignore'
		});
		expect(r.ok).toBe(true);
	});

	it('refuses a unit that does not fit the measurement', () => {
		const r = planHeader([...WIDE.slice(0, 8), 'roughness_ra_mm']);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.errors[0]).toMatch(/roughness_ra cannot be given in mm/);
	});

	it('refuses an unknown unit', () => {
		const r = planHeader([...WIDE.slice(0, 8), 'clearance_ft']);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.errors.join(' ')).toMatch(/not understood: "clearance_ft"/);
	});

	it(`refuses more than ${MAX_COLUMNS} columns`, () => {
		const r = planHeader(Array.from({ length: 10_000 }, (_, i) => `c${i}`));
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.errors[0]).toMatch(/10000 columns/);
	});
});

describe('numbers and dates', () => {
	it.each([
		['0.065', false, 0.065],
		['.5', false, 0.5],
		['1e-3', false, 0.001],
		['0,065', true, 0.065],
		['0,065', false, null],
		['1,234.5', false, null],
		['abc', false, null],
		['', false, null],
		['Infinity', false, null]
	] as const)('%s (decimal comma %s) → %s', (text, comma, want) => expect(parseNumber(text, comma)).toBe(want));

	it.each([
		['2026-03-14', Date.UTC(2026, 2, 14)],
		['2026-03-14T09:30:00Z', Date.UTC(2026, 2, 14, 9, 30)],
		['2026-03-14 09:30', Date.UTC(2026, 2, 14, 9, 30)],
		['2026-03-14T09:30:00+02:00', Date.UTC(2026, 2, 14, 7, 30)],
		['2026-03-14T09:30:00.250Z', Date.UTC(2026, 2, 14, 9, 30, 0, 250)],
		['2026-02-30', null],
		['14/03/2026', null],
		['2026-13-01', null]
	] as const)('%s', (text, want) => expect(parseTimestamp(text)).toBe(want));
});

describe('rows', () => {
	const p = plan(WIDE);
	const row = (over: Partial<Record<string, string>> = {}) => {
		const base: Record<string, string> = {
			head_serial: 'H-1', family: 'oak-4', stage: 'as_received', cylinder: '2', side: 'EX', valve: '1',
			measured_at: '2026-03-14T09:30:00Z', measured_by: 'Tester', clearance_mm: '0.065', guide_bore_in: '0.2165',
			roughness_ra_uin: '16', vacuum_hold_pct: '', ...over
		};
		return WIDE.map((h) => base[h]);
	};

	it('accepts a good row and converts units exactly', () => {
		const r = checkRow(row(), p, ctx);
		expect(r.ok).toBe(true);
		if (r.ok) {
			expect(r.row.side).toBe('exhaust');
			expect(r.row.readings).toEqual([
				{ measurement: 'clearance', value: 0.065 },
				{ measurement: 'guide_bore', value: 5.4991 },
				{ measurement: 'roughness_ra', value: 0.4064 }
			]);
		}
	});

	it.each([
		[{ family: 'PINE-6' }, /unknown family "PINE-6"/],
		[{ cylinder: '5' }, /cylinder 5 is outside OAK-4 \(cylinders 1–4\)/],
		[{ valve: '2' }, /exhaust valve 2 is outside OAK-4/],
		[{ clearance_mm: 'abc' }, /clearance_mm: "abc" is not a number/],
		[{ clearance_mm: '-0.01' }, /negative value/],
		[{ clearance_mm: '1.5' }, /not physically possible/],
		[{ roughness_ra_uin: '2000' }, /not physically possible/],
		[{ vacuum_hold_pct: '101' }, /not physically possible/],
		[{ measured_at: '2027-01-01' }, /in the future/],
		[{ measured_at: 'yesterday' }, /is not a date/],
		[{ side: 'left' }, /side "left"/],
		[{ stage: 'before' }, /stage "before"/],
		[{ head_serial: '' }, /head_serial is empty/],
		[{ measured_by: '' }, /measured_by is empty/],
		[{ clearance_mm: '', guide_bore_in: '', roughness_ra_uin: '' }, /no measurement in this row/]
	])('rejects %o', (over, reason) => {
		const r = checkRow(row(over as Record<string, string>), p, ctx);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.reason).toMatch(reason);
	});

	it('gives every reason of a bad row', () => {
		const r = checkRow(row({ family: 'PINE-6', clearance_mm: 'x' }), p, ctx);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.reason.split('; ')).toHaveLength(2);
	});

	it('rejects a row with the wrong number of fields', () => {
		const r = checkRow(['H-1', 'oak-4'], p, ctx);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.reason).toBe(`expected ${WIDE.length} fields, found 2`);
	});

	it('long layout: unit must fit the measurement', () => {
		const lp = plan(['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'unit', 'measured_at', 'measured_by']);
		const good = checkRow(['H-1', 'OAK-4', 'final', '1', 'in', '2', 'seat_width', '0.055', 'in', '2026-03-14', 'Tester'], lp, ctx);
		expect(good.ok && good.row.readings).toEqual([{ measurement: 'seat_width', value: 1.397 }]);
		const bad = checkRow(['H-1', 'OAK-4', 'final', '1', 'in', '2', 'roughness_ra', '0.3', 'mm', '2026-03-14', 'Tester'], lp, ctx);
		expect(!bad.ok && bad.reason).toMatch(/unit mm does not fit roughness_ra/);
		const unk = checkRow(['H-1', 'OAK-4', 'final', '1', 'in', '2', 'wobble', '0.3', 'mm', '2026-03-14', 'Tester'], lp, ctx);
		expect(!unk.ok && unk.reason).toMatch(/unknown measurement "wobble"/);
		const unit = checkRow(['H-1', 'OAK-4', 'final', '1', 'in', '2', 'clearance', '0.3', 'ft', '2026-03-14', 'Tester'], lp, ctx);
		expect(!unit.ok && unit.reason).toMatch(/unknown unit "ft"/);
	});
});
