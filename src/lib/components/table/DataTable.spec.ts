// Server-side rendering of DataTable: table-core's sorted and paged row models, and the markup
// screen readers rely on (caption, scope, aria-sort).
import { render } from 'svelte/server';
import { describe, expect, it } from 'vitest';
import DataTable from './DataTable.svelte';
import { folding, sortParam, sortingFrom, type DataColumn } from './columns';

type Row = { serial: string; value: number | null; at: Date };
const rows: Row[] = [
	{ serial: 'B-2', value: 0.05, at: new Date('2026-01-02T00:00:00Z') },
	{ serial: 'A-1', value: 0.08, at: new Date('2026-01-01T00:00:00Z') },
	{ serial: 'C-3', value: null, at: new Date('2026-01-03T00:00:00Z') },
	{ serial: 'D-4', value: 0.02, at: new Date('2026-01-04T00:00:00Z') }
];
const columns: DataColumn<Row>[] = [
	{ id: 'serial', header: 'Serial', value: (r) => r.serial },
	{ id: 'value', header: 'Value', value: (r) => r.value, numeric: true, format: (v) => (typeof v === 'number' ? v.toFixed(3) : '—') },
	{ id: 'at', header: 'Measured', value: (r) => r.at, sortable: false }
];
const serials = (html: string) => [...html.matchAll(/>([A-D]-\d)</g)].map((m) => m[1]);

function html(props: Record<string, unknown>) {
	return render(DataTable<Row>, { props: { rows, columns, caption: 'Readings', ...props } as never }).body;
}

describe('DataTable', () => {
	it('sorts on the client with table-core, empty values last', () => {
		expect(serials(html({ sorting: [{ id: 'value', desc: false }] }))).toEqual(['D-4', 'B-2', 'A-1', 'C-3']);
		expect(serials(html({ sorting: [{ id: 'value', desc: true }] }))).toEqual(['A-1', 'B-2', 'D-4', 'C-3']);
		expect(serials(html({ sorting: [{ id: 'serial', desc: false }] }))).toEqual(['A-1', 'B-2', 'C-3', 'D-4']);
	});

	it('leaves the order to the server when sorting is manual', () => {
		expect(serials(html({ manual: true, sorting: [{ id: 'value', desc: false }] }))).toEqual(['B-2', 'A-1', 'C-3', 'D-4']);
	});

	it('marks the sorted column with aria-sort and leaves unsortable columns without it', () => {
		const out = html({ sorting: [{ id: 'value', desc: true }] });
		expect(out).toMatch(/<th[^>]*aria-sort="none"[^>]*>.*?Serial/s);
		expect(out).toMatch(/<th[^>]*aria-sort="descending"[^>]*>.*?Value/s);
		expect(out).not.toMatch(/<th[^>]*aria-sort[^>]*>\s*Measured/);
		expect(out).toContain('<caption class="sr-only">Readings</caption>');
		expect(out).toContain('scope="col"');
		expect(out).toContain('0.050');
	});

	it('pages on the client and links the controls when given hrefs', () => {
		const out = html({ pageSize: 3, sorting: [{ id: 'serial', desc: false }] });
		expect(serials(out)).toEqual(['A-1', 'B-2', 'C-3']);
		expect(out).toMatch(/Page 1 of 2 · rows 1–3 of 4/);
		const manual = html({
			manual: true,
			rowCount: 230,
			pagination: { pageIndex: 1, pageSize: 4 },
			pageHref: (p: { pageIndex: number }) => `?page=${p.pageIndex + 1}`,
			sortHref: (s: { id: string; desc: boolean }[]) => `?sort=${sortParam(s)}`
		});
		expect(manual).toMatch(/Page 2 of 58 · rows 5–8 of 230/);
		expect(manual).toContain('href="?page=3"');
		expect(manual).toContain('href="?page=1"');
		// Numbers sort descending first (table-core's default for numeric columns).
		expect(manual).toContain('href="?sort=-value"');
		expect(manual).toContain('href="?sort=serial"');
	});

	it('links the first cell of a row to its page, and says so when empty', () => {
		expect(html({ rowHref: (r: Row) => `/heads/${r.serial}` })).toContain('href="/heads/A-1"');
		expect(html({ rows: [] })).toContain('Nothing to show.');
	});

	it('folds marked columns into a detail panel below their width, and abbreviates a header with its tooltip', () => {
		const folded: DataColumn<Row>[] = [
			columns[0],
			{ ...columns[1], short: 'Val.' },
			{ ...columns[2], detail: '5xl' }
		];
		const out = html({ columns: folded });
		// The table measures its own width; the folded column's cells hide below 64rem.
		expect(out).toMatch(/class="overflow-x-auto @container"/);
		expect(out).toMatch(/<th[^>]*class="[^"]*@max-5xl:hidden[^"]*"[^>]*>(<!--[^>]*-->|\s)*Measured/);
		// One toggle a row, for the panel, gone once the table is wide enough.
		expect(out.match(/data-testid="row-detail-toggle"/g)).toHaveLength(4);
		expect(out).toMatch(/<th scope="col" class="[^"]*@5xl:hidden[^"]*">(<!--[^>]*-->)*<span class="sr-only">Details<\/span><\/th>/);
		expect(out).toContain('aria-expanded="false"');
		expect(out).toContain('<span title="Value" aria-hidden="true">Val.</span><span class="sr-only">Value</span>');
		// Without folded columns: no toggle column and no container query.
		expect(html({})).not.toContain('row-detail-toggle');
		expect(html({})).not.toContain('@container');
	});

	it('works out the toggle column from the widest folded column', () => {
		expect(folding([{}, {}])).toBeNull();
		expect(folding([{ detail: '3xl' }, { detail: '5xl' }])).toEqual({ hidden: '@5xl:hidden', measured: true });
		expect(folding([{ detail: 'always' }])).toEqual({ hidden: '', measured: false });
		expect(folding([{ detail: 'always' }, { detail: '4xl' }])).toEqual({ hidden: '', measured: true });
	});

	it('reads and writes sort parameters', () => {
		expect(sortingFrom('-z')).toEqual([{ id: 'z', desc: true }]);
		expect(sortParam(sortingFrom('value'))).toBe('value');
		expect(sortParam([])).toBeNull();
	});
});
