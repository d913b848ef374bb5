import { describe, expect, it } from 'vitest';
import { targetNames } from './header';
import { adviseHeaders, suggestTarget } from './suggest';

describe('mapping suggestions', () => {
	const wide = targetNames('wide');
	it.each([
		['Serial No', 'head_serial'],
		['Cyl', 'cylinder'],
		['Inspector', 'measured_by'],
		['Date', 'measured_at'],
		['Clearence mm', 'clearance_mm'],
		['guide bore (in)', 'guide_bore_in'],
		['Notes about the job', 'ignore']
	])('%s → %s', (header, target) => expect(suggestTarget(header, wide)).toBe(target));

	it('advises a whole header, keeping a remembered mapping', () => {
		const a = adviseHeaders(['Serial No', 'family', 'stage', 'Cyl', 'side', 'valve', 'Date', 'Inspector', 'clearance_mm'], undefined, { Inspector: 'measured_by' });
		expect(a.ok).toBe(false);
		expect(a.unmatched).toEqual(['Serial No', 'Cyl', 'Date']);
		expect(a.suggestions).toEqual({ Inspector: 'measured_by', 'Serial No': 'head_serial', Cyl: 'cylinder', Date: 'measured_at' });
	});
});
