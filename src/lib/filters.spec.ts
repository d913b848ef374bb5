import { describe, expect, it } from 'vitest';
import { describeFilters, filterQuery, filtersOrMessage, readFilters, withParams } from './filters';

const read = (q: string) => readFilters(new URLSearchParams(q));

describe('readFilters', () => {
	it('reads every filter with the API schema (numbers as numbers)', () => {
		const r = read('family=ALDER-4&side=intake&stage=final&measurement=clearance&from=2026-01-01&to=2026-02-28&machinist=Ana&customer=Depot&mileageMin=1000&mileageMax=90000&page=3&sort=-value');
		expect(r.errors).toEqual({});
		expect(r.filters).toEqual({
			family: 'ALDER-4',
			side: 'intake',
			stage: 'final',
			measurement: 'clearance',
			from: '2026-01-01',
			to: '2026-02-28',
			machinist: 'Ana',
			customer: 'Depot',
			mileageMin: 1000,
			mileageMax: 90000
		});
	});

	it('treats blank parameters as not given', () => {
		expect(read('family=&side=%20&measurement=')).toEqual({ filters: {}, raw: {}, errors: {} });
	});

	it('keeps the good filters and explains each bad one', () => {
		const r = read('side=left&measurement=width&from=2026-02-30&mileageMin=abc&family=ALDER-4');
		expect(r.filters).toEqual({ family: 'ALDER-4' });
		expect(Object.keys(r.errors).sort()).toEqual(['from', 'measurement', 'mileageMin', 'side']);
		expect(r.errors.side).toMatch(/side must be one of: intake, exhaust/);
		expect(r.errors.from).toMatch(/not a calendar date/);
		expect(r.raw.side).toBe('left');
	});

	it('refuses a range the wrong way round', () => {
		const r = read('from=2026-03-01&to=2026-01-01&mileageMin=5000&mileageMax=10');
		expect(r.errors.from).toMatch(/from must not be after to/);
		expect(r.errors.mileageMin).toMatch(/mileageMin must not be above mileageMax/);
		expect(r.filters).toEqual({ to: '2026-01-01', mileageMax: 10 });
		expect(filtersOrMessage(new URLSearchParams('from=2026-03-01&to=2026-01-01')).message).toMatch(/from must not be after to/);
	});
});

describe('withParams', () => {
	const url = new URL('http://x/outliers?measurement=clearance&page=4&sort=-z');
	it('sets and removes parameters and goes back to page 1 when a filter changes', () => {
		const next = withParams(url, { side: 'exhaust', measurement: null });
		expect(next.search).toBe('?sort=-z&side=exhaust');
	});
	it('keeps the page when only the sort or page changes', () => {
		expect(withParams(url, { sort: 'value' }).searchParams.get('page')).toBe('4');
		expect(withParams(url, { page: 5 }).searchParams.get('page')).toBe('5');
	});
});

describe('filterQuery and describeFilters', () => {
	it('writes only the filters given, in a fixed order, plus extras', () => {
		expect(filterQuery({ measurement: 'clearance', side: 'intake', mileageMin: 0 }, { format: 'csv', empty: '' })).toBe('side=intake&measurement=clearance&mileageMin=0&format=csv');
	});
	it('says what a selection is in words', () => {
		expect(describeFilters({})).toBe('All readings');
		expect(describeFilters({ family: 'ALDER-4', side: 'exhaust', measurement: 'seat_width', mileageMin: 10000 })).toBe('ALDER-4 · Exhaust · Seat width · 10,000–… km');
	});
});
