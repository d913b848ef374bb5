import { describe, expect, it } from 'vitest';
import {
	checkQuerySchema,
	compareQuerySchema,
	describeBodySchema,
	distributionQuerySchema,
	issuesMessage,
	outliersQuerySchema,
	queryObject,
	ratesQuerySchema
} from './stats';

const q = (s: string) => queryObject(new URLSearchParams(s));
const message = (r: { success: boolean; error?: { issues: Parameters<typeof issuesMessage>[0] } }) =>
	r.success ? null : issuesMessage(r.error!.issues);

describe('statistics query strings', () => {
	it('reads the filters, dropping empty parameters', () => {
		const r = distributionQuerySchema.safeParse(
			q('measurement=clearance&family=ALDER-4&side=intake&stage=&from=2026-01-01&to=2026-03-31&mileageMin=100000')
		);
		expect(r.success).toBe(true);
		expect(r.data).toEqual({ measurement: 'clearance', family: 'ALDER-4', side: 'intake', from: '2026-01-01', to: '2026-03-31', mileageMin: 100000 });
	});

	it('says which parameter is missing, unknown or wrong', () => {
		expect(message(distributionQuerySchema.safeParse(q('')))).toMatch(/measurement must be one of/);
		expect(message(distributionQuerySchema.safeParse(q('measurement=wobble')))).toMatch(/measurement must be one of: stem_diameter/);
		expect(message(distributionQuerySchema.safeParse(q('measurement=clearance&colour=red')))).toBe('unknown parameter: colour');
		expect(message(distributionQuerySchema.safeParse(q('measurement=clearance&from=2026-02-30')))).toBe('from is not a calendar date');
		expect(message(distributionQuerySchema.safeParse(q('measurement=clearance&from=2026-03-01&to=2026-02-01')))).toBe('from must not be after to');
		expect(message(distributionQuerySchema.safeParse(q('measurement=clearance&mileageMin=-5')))).toBe('mileageMin must be a whole number');
		expect(message(distributionQuerySchema.safeParse(q('measurement=clearance&side=left')))).toBe('side must be one of: intake, exhaust');
		expect(message(compareQuerySchema.safeParse(q('measurement=clearance&family=X')))).toBe('unknown parameter: family');
	});

	it('check: a number with a point, never a comma or words; stage defaults to as-received', () => {
		const ok = checkQuerySchema.safeParse(q('family=ALDER-4&side=intake&measurement=clearance&value=0.0025&unit=in'));
		expect(ok.data).toMatchObject({ stage: 'as_received', value: 0.0025, unit: 'in' });
		expect(message(checkQuerySchema.safeParse(q('family=ALDER-4&side=intake&measurement=clearance&value=abc')))).toBe(
			'value must be a number, such as 0.065'
		);
		expect(message(checkQuerySchema.safeParse(q('family=ALDER-4&side=intake&measurement=clearance&value=0,065')))).toMatch(/value must be a number/);
		expect(message(checkQuerySchema.safeParse(q('family=ALDER-4&side=intake&measurement=clearance&value=1e999')))).toBe('value is too large');
		expect(message(checkQuerySchema.safeParse(q('side=intake&measurement=clearance&value=0.05')))).toBe('family is required');
		expect(message(checkQuerySchema.safeParse(q('family=A&side=intake&measurement=clearance')))).toBe('value is required');
		expect(message(checkQuerySchema.safeParse(q('family=A&side=intake&measurement=clearance&value=1&unit=furlong')))).toMatch(/unit must be one of/);
	});

	it('outliers: paging and sort with defaults and bounds', () => {
		expect(outliersQuerySchema.safeParse(q('measurement=clearance')).data).toMatchObject({ page: 1, pageSize: 50, sort: '-measuredAt' });
		expect(message(outliersQuerySchema.safeParse(q('measurement=clearance&pageSize=501')))).toBe('pageSize must be at most 500');
		expect(message(outliersQuerySchema.safeParse(q('measurement=clearance&page=0')))).toBe('page starts at 1');
		expect(message(outliersQuerySchema.safeParse(q('measurement=clearance&sort=family')))).toMatch(/sort must be one of/);
	});

	it('rates: a measurement or decision:<kind>', () => {
		expect(ratesQuerySchema.safeParse(q('check=clearance')).data?.check).toEqual({ kind: 'measurement', measurement: 'clearance' });
		expect(ratesQuerySchema.safeParse(q('check=decision:replace_guide')).data?.check).toEqual({ kind: 'decision', decision: 'replace_guide' });
		expect(message(ratesQuerySchema.safeParse(q('check=decision:paint')))).toMatch(/check must be a measurement/);
		expect(message(ratesQuerySchema.safeParse(q('check=decision:lap&stage=final')))).toBe('stage does not apply to a decision check');
	});

	it('describe: a JSON array of finite numbers, at most 100,000', () => {
		expect(describeBodySchema.safeParse([1, 2, 3]).success).toBe(true);
		expect(describeBodySchema.safeParse([]).success).toBe(true);
		expect(message(describeBodySchema.safeParse({ values: [1] }))).toMatch(/JSON array of numbers/);
		expect(message(describeBodySchema.safeParse([1, '2']))).toMatch(/every element must be a finite number/);
		expect(message(describeBodySchema.safeParse([1, Number.POSITIVE_INFINITY]))).toMatch(/finite/);
		expect(message(describeBodySchema.safeParse(new Array(100_001).fill(1)))).toBe('at most 100000 numbers');
	});
});
