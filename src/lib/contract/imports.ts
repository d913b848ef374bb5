// The import API (/api/v1/imports…): batches, the answer to an upload, an undo and the header advice.
import { z } from 'zod';
import { count, instant, named } from './common';

export const layout = z.enum(['wide', 'long']);
export const onReject = z.enum(['abort', 'skip']);
/** The statuses of import_batches (the database's batch_status enum). */
export const batchStatus = z.enum(['running', 'committed', 'failed', 'undone']);

export const ImportReject = named('ImportReject', z.strictObject({ line: z.int(), reason: z.string(), raw: z.string() }));
export type ImportReject = z.output<typeof ImportReject>;

export const ImportBatch = named(
	'ImportBatch',
	z.strictObject({
		id: z.uuid(),
		fileName: z.string(),
		layout,
		onReject,
		status: batchStatus,
		accepted: count,
		rejected: count,
		readings: count,
		duplicates: count,
		createdHeads: count,
		bytes: count,
		progressRows: count,
		clientRef: z.string().nullable(),
		error: z.string().nullable(),
		createdBy: z.string().nullable().meta({ description: 'E-mail of who uploaded it.' }),
		createdAt: instant,
		finishedAt: instant.nullable()
	})
);
export type ImportBatch = z.output<typeof ImportBatch>;

export const ImportList = named('ImportList', z.strictObject({ batches: z.array(ImportBatch) }));
export const ImportDetail = named('ImportDetail', z.strictObject({ ...ImportBatch.shape, rejects: z.array(ImportReject) }));

/** The answer to POST /api/v1/imports: 201 stored, 200 a dry run, 409 the same file was
 * imported before (duplicateOf), 422 rows were refused and onReject was abort. */
export const ImportAnswer = named(
	'ImportAnswer',
	z.strictObject({
		batchId: z.uuid().nullable(),
		dryRun: z.boolean(),
		layout,
		accepted: count,
		rejected: count,
		readings: count,
		duplicates: count,
		createdHeads: count,
		duplicateOf: z.uuid().nullable(),
		rejects: z.array(ImportReject).meta({ description: 'The first 20 rejected rows.' }),
		bytes: count,
		seconds: z.number(),
		timings: z.record(z.string(), z.number()).optional().meta({ description: 'Milliseconds spent in each phase.' }),
		path: z.enum(['direct-replica', 'direct', 'staged']).optional().meta({ description: 'How the readings went in.' }),
		onReject: onReject.meta({ description: 'What was done with rejected rows.' }),
		onRejectFrom: z.enum(['request', 'shop setting']).meta({ description: 'Whether that came from the request or the shop’s setting.' }),
		message: z.string().optional()
	})
);
export type ImportAnswer = z.output<typeof ImportAnswer>;

/** A header row the import cannot place (422): what it read and what it could not match. */
export const HeaderRefusal = named(
	'HeaderRefusal',
	z.strictObject({ message: z.string(), headers: z.array(z.string()), unmatched: z.array(z.string()), layout })
);

export const ImportUndone = named(
	'ImportUndone',
	z.strictObject({ batchId: z.uuid(), status: z.literal('undone'), readingsRemoved: count, headsRemoved: count })
);
export type ImportUndone = z.output<typeof ImportUndone>;

export const HeaderAdvice = named(
	'HeaderAdvice',
	z.strictObject({
		layout,
		ok: z.boolean(),
		errors: z.array(z.string()),
		unmatched: z.array(z.string()),
		suggestions: z.record(z.string(), z.string()).meta({ description: 'File header → suggested Lapmark column.' }),
		targets: z.array(z.string()).meta({ description: 'The column names a header may be mapped to.' }),
		remembered: z.boolean().meta({ description: 'Whether a mapping remembered for these headers was used.' })
	})
);
export type HeaderAdvice = z.output<typeof HeaderAdvice>;
