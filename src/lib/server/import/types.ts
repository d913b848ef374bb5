// What an import is asked to do and what it answers: the options, the result and its outcome
// (status and message), and the phase timer whose keys the result's `timings` carries.
import type { Layout } from './header';

export type OnReject = 'abort' | 'skip';
export type ImportPath = 'direct-replica' | 'direct' | 'staged';

export interface ImportOptions {
	shopId: string;
	actor: { userId: string | null; label: string };
	fileName: string;
	layout?: Layout;
	dryRun: boolean;
	onReject: OnReject;
	/** Original header → Lapmark name or `ignore`; when absent, a remembered mapping is used. */
	mapping?: Record<string, string>;
	clientRef?: string;
	limitBytes: number;
	now?: Date;
	/** false: stage every row even when the import role is there (tests compare both ways). */
	direct?: boolean;
	/** false: take the direct way with every row's foreign-key checks (tests compare both ways). */
	replica?: boolean;
}

export interface RejectSample {
	line: number;
	reason: string;
	raw: string;
}

/** Milliseconds spent in each phase, for the benchmark and the batch's record. */
export type Timings = Record<string, number>;

export type Timer = ReturnType<typeof timer>;

/** Each `mark(label)` adds the time since the previous mark (or the start) to `timings[label]`. */
export function timer() {
	const timings: Timings = {};
	let last = performance.now();
	return {
		timings,
		mark(label: string) {
			const now = performance.now();
			timings[label] = Math.round((timings[label] ?? 0) + now - last);
			last = now;
		}
	};
}

export interface ImportResult {
	batchId: string | null;
	dryRun: boolean;
	layout: Layout;
	accepted: number;
	rejected: number;
	readings: number;
	duplicates: number;
	createdHeads: number;
	duplicateOf: string | null;
	rejects: RejectSample[];
	bytes: number;
	seconds: number;
	timings?: Timings;
	/** How readings went in: COPY straight into readings (in replica mode, keys checked per batch),
	 * or through the staging table. */
	path?: ImportPath;
}

export type ImportOutcome =
	| { status: 200 | 201; result: ImportResult }
	| { status: 409; result: ImportResult; message: string }
	| { status: 422; result: ImportResult; message: string };

/** A result with no readings, duplicates or heads counted (yet), keys in the answer's order. */
export function newResult(r: {
	batchId: string | null;
	dryRun: boolean;
	layout: Layout;
	bytes: number;
	seconds: number;
	accepted?: number;
	rejected?: number;
	rejects?: RejectSample[];
}): ImportResult {
	return {
		batchId: r.batchId,
		dryRun: r.dryRun,
		layout: r.layout,
		accepted: r.accepted ?? 0,
		rejected: r.rejected ?? 0,
		readings: 0,
		duplicates: 0,
		createdHeads: 0,
		duplicateOf: null,
		rejects: r.rejects ?? [],
		bytes: r.bytes,
		seconds: r.seconds
	};
}
