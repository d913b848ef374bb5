// The statistics filters as they live in a page's URL (so a view can be bookmarked and shared):
// read and checked with the API's own zod schemas, written back with every other parameter of
// the URL kept. Shared by client and server; FilterBar.svelte is the form that edits them.
import { z } from 'zod';
import { MEASUREMENTS, MEASUREMENT_INFO, type Measurement } from './measurements';
import { filtersSchema, issuesMessage, type StatsFilters } from './schemas/stats';

/** The URL parameters the filters use, in the order a form shows them. */
export const FILTER_KEYS = ['family', 'side', 'stage', 'measurement', 'from', 'to', 'machinist', 'customer', 'mileageMin', 'mileageMax'] as const;
export type FilterKey = (typeof FILTER_KEYS)[number];

/** The controls a FilterBar can show; `mileage` is the pair mileageMin/mileageMax. */
export type FilterField = 'family' | 'side' | 'stage' | 'measurement' | 'from' | 'to' | 'machinist' | 'customer' | 'mileage';

export const FIELD_KEYS: Record<FilterField, FilterKey[]> = {
	family: ['family'],
	side: ['side'],
	stage: ['stage'],
	measurement: ['measurement'],
	from: ['from'],
	to: ['to'],
	machinist: ['machinist'],
	customer: ['customer'],
	mileage: ['mileageMin', 'mileageMax']
};

/** The checked filters: the statistics filters plus the measurement. */
export type UrlFilters = StatsFilters & { measurement?: Measurement };

/** Raw text of each filter parameter present in the URL. */
export type RawFilters = Partial<Record<FilterKey, string>>;

export interface ReadFilters {
	/** Every filter that passed its check. */
	filters: UrlFilters;
	/** The text as found in the URL (what the form shows back). */
	raw: RawFilters;
	/** Why a parameter was not used, by parameter. */
	errors: Partial<Record<FilterKey, string>>;
}

const measurementSchema = z.enum(MEASUREMENTS, { message: `measurement must be one of: ${MEASUREMENTS.join(', ')}` });

/** The raw filter parameters of a URL (blank ones are "not given"). */
export function rawFilters(params: URLSearchParams): RawFilters {
	const raw: RawFilters = {};
	for (const k of FILTER_KEYS) {
		const v = params.get(k);
		if (v !== null && v.trim() !== '') raw[k] = v.trim();
	}
	return raw;
}

/**
 * Reads the filters of a URL with the statistics API's schemas. A bad parameter is left out of
 * `filters` and explained in `errors`, so a page still shows what the good ones select.
 */
export function readFilters(params: URLSearchParams): ReadFilters {
	const raw = rawFilters(params);
	const errors: ReadFilters['errors'] = {};
	const { measurement, ...rest } = raw;
	let filters: UrlFilters = {};
	if (measurement !== undefined) {
		const m = measurementSchema.safeParse(measurement);
		if (m.success) filters.measurement = m.data;
		else errors.measurement = issuesMessage(m.error.issues);
	}
	const input: Record<string, string> = { ...rest };
	// Each round drops the parameters named by the issues, so at most one round per parameter.
	for (let round = 0; round <= FILTER_KEYS.length; round++) {
		const r = filtersSchema.safeParse(input);
		if (r.success) {
			filters = { ...r.data, ...filters };
			break;
		}
		for (const issue of r.error.issues) {
			const key = String(issue.path[0] ?? '') as FilterKey;
			if (!(key in input)) continue;
			errors[key] ??= issuesMessage([issue]);
			delete input[key];
		}
	}
	return { filters, raw, errors };
}

/** Thrown-free check for servers: the filters, or one message naming every bad parameter. */
export function filtersOrMessage(params: URLSearchParams): { filters: UrlFilters; message: string | null } {
	const { filters, errors } = readFilters(params);
	const messages = Object.values(errors);
	return { filters, message: messages.length ? messages.join('; ') : null };
}

type Value = string | number | null | undefined;

/**
 * A copy of `url` with `changes` applied (null, undefined or '' removes a parameter). Changing
 * any filter sends the view back to its first page, since the old page number means nothing.
 */
export function withParams(url: URL, changes: Record<string, Value>, opts: { resetPage?: boolean } = {}): URL {
	const next = new URL(url);
	for (const [k, v] of Object.entries(changes)) {
		if (v === null || v === undefined || String(v).trim() === '') next.searchParams.delete(k);
		else next.searchParams.set(k, String(v).trim());
	}
	const touchesFilter = Object.keys(changes).some((k) => (FILTER_KEYS as readonly string[]).includes(k));
	if (opts.resetPage ?? touchesFilter) next.searchParams.delete('page');
	return next;
}

/** The filters as query parameters for an /api/v1 URL (absent ones left out), plus `extra`. */
export function filterQuery(filters: UrlFilters, extra: Record<string, Value> = {}): string {
	const q = new URLSearchParams();
	for (const k of FILTER_KEYS) {
		const v = filters[k];
		if (v !== undefined) q.set(k, String(v));
	}
	for (const [k, v] of Object.entries(extra)) if (v !== null && v !== undefined && v !== '') q.set(k, String(v));
	return q.toString();
}

/** Words for a filter value, as the form and the page headings show them. */
export const SIDE_LABEL = { intake: 'Intake', exhaust: 'Exhaust' } as const;
export const STAGE_LABEL = { as_received: 'As received', final: 'Final' } as const;
export const measurementLabel = (m: Measurement) => MEASUREMENT_INFO[m].label;

/** One line saying what the filters select, e.g. "ALDER-4 · Intake · As received". */
export function describeFilters(f: UrlFilters): string {
	const parts: string[] = [];
	if (f.family) parts.push(f.family);
	if (f.side) parts.push(SIDE_LABEL[f.side]);
	if (f.stage) parts.push(STAGE_LABEL[f.stage]);
	if (f.measurement) parts.push(measurementLabel(f.measurement));
	if (f.from || f.to) parts.push(`${f.from ?? '…'} to ${f.to ?? '…'}`);
	if (f.machinist) parts.push(`measured by ${f.machinist}`);
	if (f.customer) parts.push(`customer ${f.customer}`);
	if (f.mileageMin !== undefined || f.mileageMax !== undefined) {
		parts.push(`${f.mileageMin?.toLocaleString('en-US') ?? '0'}–${f.mileageMax?.toLocaleString('en-US') ?? '…'} km`);
	}
	return parts.length ? parts.join(' · ') : 'All readings';
}
