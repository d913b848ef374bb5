// Audit entries worded as sentences, from entries shaped as the services write them.
import { describe, expect, it } from 'vitest';
import { auditSentence, longDay } from './audit-words';

const who = 'engineer@example.test';

describe('auditSentence', () => {
	it('words a limit change with both versions, the unit and the day it takes effect', () => {
		expect(
			auditSentence({
				actorLabel: who,
				entity: 'limit',
				action: 'update',
				before: { min: null, max: 0.12, note: '' },
				after: { family: 'ALDER-4', measurement: 'clearance', side: 'exhaust', stage: 'final', min: null, max: 0.11, effectiveFrom: '2026-12-02', note: '', typed: { min: '', max: '0.110', unit: 'mm' } }
			})
		).toBe('engineer@example.test changed the final exhaust stem-to-guide clearance limit of ALDER-4 from at most 0.120 mm to at most 0.110 mm, effective 2 Dec 2026.');
		expect(
			auditSentence({
				actorLabel: who,
				entity: 'limit',
				action: 'create',
				before: null,
				after: { family: 'BIRCH-6', measurement: 'seat_width', side: 'both', stage: 'as_received', min: 1.016, max: 2.032, effectiveFrom: '2026-01-05', note: 'new insert', typed: { min: 0.04, max: 0.08, unit: 'in' } }
			})
		).toBe('engineer@example.test set the as-received seat width limit of BIRCH-6 to 1.02 – 2.03 mm, typed 0.04 – 0.08 in, effective 5 Jan 2026 (“new insert”).');
	});

	it('words readings recorded, corrected and deleted, with the unit they were typed in', () => {
		const what = { head: 'HX-1042', stage: 'as_received', position: 'cyl 3 exhaust', measurement: 'clearance' };
		expect(auditSentence({ actorLabel: 'Ana Machinist', entity: 'reading', action: 'create', before: null, after: { ...what, value: 0.0762, typed: { text: '0.0030', unit: 'in' } } })).toBe(
			'Ana Machinist recorded 0.076 mm (typed 0.0030 in) as the as-received stem-to-guide clearance reading at cyl 3 exhaust of head HX-1042.'
		);
		expect(auditSentence({ actorLabel: 'Ana Machinist', entity: 'reading', action: 'update', before: { value: 0.5, measuredBy: 'x' }, after: { ...what, value: 0.05, typed: { text: '0.050', unit: 'mm' } } })).toBe(
			'Ana Machinist changed the as-received stem-to-guide clearance reading at cyl 3 exhaust of head HX-1042 from 0.500 mm to 0.050 mm.'
		);
		expect(auditSentence({ actorLabel: 'Ana Machinist', entity: 'reading', action: 'delete', before: { ...what, value: 0.05, measuredBy: 'x' }, after: null })).toBe(
			'Ana Machinist deleted the as-received stem-to-guide clearance reading at cyl 3 exhaust of head HX-1042: it was 0.050 mm.'
		);
	});

	it('words head moves, decisions, roles and tokens', () => {
		expect(auditSentence({ actorLabel: who, entity: 'head', action: 'update', before: { status: 'final_check' }, after: { status: 'released', releasedOn: '2026-12-03' } })).toBe(
			'engineer@example.test moved the head from final check to released on 3 Dec 2026.'
		);
		expect(
			auditSentence({ actorLabel: who, entity: 'decision', action: 'create', before: null, after: { head: 'HX-1', position: 'cyl 1 intake', suggested: 'lap', kind: 'recut_seat', note: '', overridesSuggestion: true } })
		).toBe('engineer@example.test decided “Recut the seat” for cyl 1 intake of head HX-1 instead of the suggested “Lap only”.');
		expect(auditSentence({ actorLabel: who, entity: 'membership', action: 'update', before: { role: 'viewer' }, after: { role: 'machinist' } })).toBe(
			'engineer@example.test changed a member’s role from viewer to machinist.'
		);
		expect(auditSentence({ actorLabel: who, entity: 'api_token', action: 'revoke', before: { name: 'nightly export', prefix: 'lmk_ab12' }, after: null })).toBe(
			'engineer@example.test revoked the API token “nightly export” (lmk_ab12…).'
		);
	});

	it('words what it does not know from the kind of record and the change', () => {
		expect(auditSentence({ actorLabel: who, entity: 'something_new', action: 'delete', before: null, after: null })).toBe('engineer@example.test deleted a something new.');
		expect(auditSentence({ actorLabel: '', entity: 'import', action: 'create', before: null, after: {} })).toBe('Someone added an import.');
		expect(
			auditSentence({ actorLabel: who, entity: 'import', action: 'import', before: null, after: { fileName: 'week-48.csv', accepted: 120, rejected: 2, readings: 1440, duplicates: 0, createdHeads: 10 } })
		).toBe('engineer@example.test imported “week-48.csv”: 1,440 readings from 120 rows (2 rows refused, 10 heads added).');
	});

	it('writes days as a person reads them', () => {
		expect(longDay('2026-12-02')).toBe('2 Dec 2026');
		expect(longDay('2027-01-31T10:00:00Z')).toBe('31 Jan 2027');
		expect(longDay('soon')).toBe('soon');
	});
});
