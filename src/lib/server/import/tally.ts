// What the import notes about the file's rows as they stream by, for the checks and inserts after
// the last row: counts, the heads the file creates, and the line of each reading that went
// straight into readings.
import { v7 as uuidv7 } from 'uuid';
import type { GoodRow } from './rows';

export interface NewHead {
	/** Chosen here, so staged readings carry their head and need no join to find it. */
	id: string;
	familyId: string;
	customer: string | null;
	mileageKm: number | null;
	firstAt: string;
	hasFinal: boolean;
}

export interface Tally {
	goodRows: number;
	badRows: number;
	goodReadings: number;
	dupCandidates: number;
	newHeads: Map<string, NewHead>;
}

/** Notes a head the import creates (first row's identity columns win); returns its id. The ids
 * grow with time (UUID version 7), so a file's readings go in at the end of the index on
 * (head, stage, position, measurement, time) instead of all over it. */
export function noteNewHead(heads: Map<string, NewHead>, g: GoodRow): string {
	const h = heads.get(g.serial);
	if (!h) {
		const id = uuidv7();
		heads.set(g.serial, { id, familyId: g.family.id, customer: g.customer, mileageKm: g.mileageKm, firstAt: g.measuredAt, hasFinal: g.stage === 'final' });
		return id;
	}
	if (g.measuredAt < h.firstAt) h.firstAt = g.measuredAt;
	if (g.stage === 'final') h.hasFinal = true;
	h.customer ??= g.customer;
	h.mileageKm ??= g.mileageKm;
	return h.id;
}

/** The line of each reading COPYed straight into readings, in the order they went in. */
export class DirectLines {
	private lines = new Uint32Array(1024);
	private ends = new Uint32Array(1024); // readings so far, after each row
	private rows = 0;
	readings = 0;
	add(line: number, readings: number) {
		if (this.rows === this.lines.length) {
			const grow = (a: Uint32Array) => {
				const b = new Uint32Array(a.length * 2);
				b.set(a);
				return b;
			};
			this.lines = grow(this.lines);
			this.ends = grow(this.ends);
		}
		this.readings += readings;
		this.lines[this.rows] = line;
		this.ends[this.rows++] = this.readings;
	}
	/** The line of the n-th reading (1-based). */
	lineOf(n: number): number {
		let lo = 0;
		let hi = this.rows - 1;
		while (lo < hi) {
			const mid = (lo + hi) >>> 1;
			if (this.ends[mid] < n) lo = mid + 1;
			else hi = mid;
		}
		return this.lines[lo];
	}
}
