// Column definitions for DataTable: what a header says, the value a column sorts on, and how a
// cell shows it (a formatter or a snippet). DataTable turns them into @tanstack/table-core
// column definitions.
import type { Snippet } from 'svelte';
import { isoDay } from '$lib/domain/days';
import { MISSING } from '$lib/format';

export type CellValue = string | number | boolean | Date | null | undefined;

export interface DataColumn<T> {
	/** Unique within the table; also the sort key a server sees (`sort=id` / `sort=-id`). */
	id: string;
	header: string;
	/** The value the column sorts on and, without `format` or `cell`, shows. */
	value: (row: T) => CellValue;
	/** Text of a cell (default: the value as text, '—' when empty). */
	format?: (value: CellValue, row: T) => string;
	/** Markup of a cell, instead of text. */
	cell?: Snippet<[T]>;
	/** Default true. */
	sortable?: boolean;
	/** Numbers: right-aligned, tabular figures, never wrapped. */
	numeric?: boolean;
	/** Extra classes for the header and cells. */
	class?: string;
	/** A short header for a narrow column; the full `header` is its tooltip and what a screen
	 * reader says. */
	short?: string;
	/**
	 * Moves the column into the row's detail panel (opened by the row's last cell) instead of
	 * a column of its own: `'always'`, or only while the table is narrower than a width (Tailwind's
	 * container sizes: 3xl 48rem, 4xl 56rem, 5xl 64rem, 6xl 72rem), so a table fits a tablet and
	 * still shows every column on a wide screen.
	 */
	detail?: DetailWidth;
}

export type DetailWidth = 'always' | '3xl' | '4xl' | '5xl' | '6xl';
const WIDTHS: DetailWidth[] = ['3xl', '4xl', '5xl', '6xl'];

// Literal class names (Tailwind finds the classes it generates by reading the source): hide a
// folded column's cells below its width, its detail entry from that width on.
const COLUMN_HIDDEN: Record<DetailWidth, string> = {
	always: 'hidden',
	'3xl': '@max-3xl:hidden',
	'4xl': '@max-4xl:hidden',
	'5xl': '@max-5xl:hidden',
	'6xl': '@max-6xl:hidden'
};
const DETAIL_HIDDEN: Record<DetailWidth, string> = {
	always: '',
	'3xl': '@3xl:hidden',
	'4xl': '@4xl:hidden',
	'5xl': '@5xl:hidden',
	'6xl': '@6xl:hidden'
};

/** Classes of a column's header and cells: hidden while the column is folded into the detail panel. */
export const columnHidden = (c: { detail?: DetailWidth }): string => (c.detail ? COLUMN_HIDDEN[c.detail] : '');
/** Classes of a column's entry in the detail panel: hidden while it is a column of its own. */
export const detailHidden = (c: { detail?: DetailWidth }): string => (c.detail ? DETAIL_HIDDEN[c.detail] : '');

/**
 * How a table folds: null when no column ever moves into the detail panel; else the classes of the
 * detail toggle column and detail rows (hidden once every folded column has room), and whether
 * the table must measure its own width (a container query) to decide.
 */
export function folding(columns: readonly { detail?: DetailWidth }[]): { hidden: string; measured: boolean } | null {
	const folded = columns.map((c) => c.detail).filter((d): d is DetailWidth => Boolean(d));
	if (folded.length === 0) return null;
	const measured = folded.some((d) => d !== 'always');
	if (folded.includes('always')) return { hidden: '', measured };
	const widest = WIDTHS.filter((w) => folded.includes(w)).at(-1)!;
	return { hidden: DETAIL_HIDDEN[widest], measured };
}

/** The text of a value when a column has no formatter. */
export function plain(value: CellValue): string {
	if (value === null || value === undefined || value === '') return MISSING;
	if (value instanceof Date) return isoDay(value);
	if (typeof value === 'number') return value.toLocaleString('en-US', { maximumFractionDigits: 6 });
	if (typeof value === 'boolean') return value ? 'yes' : 'no';
	return value;
}

/** Sort state in a URL: `id` ascending, `-id` descending. */
export function sortParam(sorting: readonly { id: string; desc: boolean }[]): string | null {
	const s = sorting[0];
	return s ? `${s.desc ? '-' : ''}${s.id}` : null;
}
export function sortingFrom(param: string | null | undefined): { id: string; desc: boolean }[] {
	if (!param) return [];
	return param.startsWith('-') ? [{ id: param.slice(1), desc: true }] : [{ id: param, desc: false }];
}
