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
	/** Numbers: right-aligned, tabular figures. */
	numeric?: boolean;
	/** Extra classes for the header and cells. */
	class?: string;
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
