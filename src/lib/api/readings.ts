// GET /api/v1/readings as the browser sees it: one page of readings for a table, and the
// export links built from the same filters.
import type { CanonicalUnit, Measurement, Side, Stage } from '../measurements';
import type { ReadingSort } from '../schemas/readings';
import type { EchoFilters } from './stats';

export type ReadingItem = {
	id: number;
	headId: string;
	headSerial: string;
	family: string;
	customer: string;
	stage: Stage;
	cylinder: number;
	side: Side;
	valve: number;
	measurement: Measurement;
	value: number;
	unit: CanonicalUnit;
	/** ISO 8601, UTC. */
	measuredAt: string;
	measuredBy: string;
	instrument: string | null;
	mileageKm: number | null;
	batch: string | null;
};

export interface ReadingsPage {
	filters: EchoFilters & { measurement?: Measurement };
	page: number;
	pageSize: number;
	sort: ReadingSort;
	/** Readings the filters select, in all pages. */
	total: number;
	pages: number;
	items: ReadingItem[];
}

/** Readings per measurement and stage, in the order of the measurement list. */
export interface ReadingCount {
	measurement: Measurement;
	stage: Stage;
	n: number;
}
