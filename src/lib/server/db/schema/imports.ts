import { sql } from 'drizzle-orm';
import { bigint, check, index, integer, jsonb, pgTable, text, unique, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { createdAt, timestampTz, uuidKey } from './columns';
import { batchStatusEnum } from './enums';
import { byUser, sameShopKey, shopRef } from './refs';

/** One uploaded file. Its readings are committed together with it or not at all. */
export const importBatches = pgTable(
	'import_batches',
	{
		id: uuidKey(),
		shopId: shopRef(),
		fileName: text().notNull(),
		contentHash: text().notNull(),
		layout: text().notNull(),
		onReject: text().notNull(),
		status: batchStatusEnum().notNull().default('running'),
		rowsAccepted: integer().notNull().default(0),
		rowsRejected: integer().notNull().default(0),
		readings: integer().notNull().default(0),
		duplicates: integer().notNull().default(0),
		createdHeads: integer().notNull().default(0),
		bytes: bigint({ mode: 'number' }).notNull().default(0),
		/** Rows read so far while running, for the progress bar (written from outside the import's transaction). */
		progressRows: integer().notNull().default(0),
		/** A reference the uploading page chose, so it can follow progress before the answer comes. */
		clientRef: text(),
		error: text(),
		createdBy: byUser(),
		createdAt: createdAt(),
		finishedAt: timestampTz(),
		/** Renewed every few seconds while the import runs (from outside its transaction); a running
		 * batch whose heartbeat stopped belongs to an import that died, and is marked failed. */
		heartbeatAt: timestampTz().notNull().defaultNow()
	},
	(t) => [
		unique('import_batches_shop_id_key').on(t.shopId, t.id),
		// One committed batch per file content: a second upload of the same bytes is refused.
		uniqueIndex('import_batches_committed_hash_key').on(t.shopId, t.contentHash).where(sql`${t.status} = 'committed'`),
		index('import_batches_shop_created_idx').on(t.shopId, t.createdAt),
		index('import_batches_running_idx').on(t.heartbeatAt).where(sql`${t.status} = 'running'`),
		check('import_batches_layout', sql`${t.layout} in ('wide', 'long')`),
		check('import_batches_on_reject', sql`${t.onReject} in ('abort', 'skip')`),
		check(
			'import_batches_counts',
			sql`${t.rowsAccepted} >= 0 and ${t.rowsRejected} >= 0 and ${t.readings} >= 0 and ${t.duplicates} >= 0 and ${t.createdHeads} >= 0`
		)
	]
);
export type ImportBatch = typeof importBatches.$inferSelect;

/** Every rejected row of a batch, with its line number, its text and why. */
export const importRejects = pgTable(
	'import_rejects',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		batchId: uuid().notNull(),
		line: integer().notNull(),
		raw: text().notNull(),
		reason: text().notNull()
	},
	(t) => [
		sameShopKey('import_rejects_batch_fk', t.shopId, t.batchId, importBatches).onDelete('cascade'),
		index('import_rejects_batch_idx').on(t.batchId, t.line),
		check('import_rejects_line_positive', sql`${t.line} >= 1`)
	]
);

/** A column mapping a person confirmed, remembered for the next file with the same headers. */
export const importMappings = pgTable(
	'import_mappings',
	{
		id: uuidKey(),
		shopId: shopRef(),
		signature: text().notNull(),
		layout: text().notNull(),
		mapping: jsonb().$type<Record<string, string>>().notNull(),
		updatedAt: timestampTz().notNull().defaultNow()
	},
	(t) => [
		unique('import_mappings_shop_signature_key').on(t.shopId, t.signature),
		check('import_mappings_layout', sql`${t.layout} in ('wide', 'long')`)
	]
);
