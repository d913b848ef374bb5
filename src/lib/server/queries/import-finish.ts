// The import's SQL after the last row (import/finish.ts runs it): checks across the file's rows
// on the staging table, then the writes (rejects, new heads, readings, the batch, the audit row),
// and the key check of a replica-mode load. On the import transaction's postgres.js client.
import type { ScopedSql } from '../db/scope';
import type { NewHead } from '../import/tally';
import type { RejectSample } from '../import/types';

/** Statistics for the planner before any join on the staging table. */
export async function analyzeStage(t: ScopedSql): Promise<void> {
	await t`analyze import_stage`;
}

/** Staged readings with the same key as an earlier staged one: the later line, with the first
 * line of its key. Only keys the sieve flagged (`dup`) are compared. */
export async function duplicatesWithinStage(t: ScopedSql) {
	return t<{ line: number; first: number }[]>`
		with cand as (
			select distinct serial, stage, cylinder, side, valve, measurement, measured_at from import_stage where dup
		), k as (
			select s.line, min(s.line) over (partition by s.serial, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.measured_at) as first_line
			from import_stage s join cand c using (serial, stage, cylinder, side, valve, measurement, measured_at)
			where s.reason is null
		)
		select line, min(first_line) as first from k where line <> first_line group by line`;
}

/** Flagged staged readings of new heads with the same key as a reading already in readings (one
 * that went straight in): the staged line and that reading's id. The lookup goes by head,
 * through the identity index. */
export async function stagedMatchingStored(t: ScopedSql) {
	return t<{ line: number; id: string }[]>`
		select s.line, r.id from import_stage s
		join readings r on r.head_id = s.head_id and r.stage = s.stage and r.cylinder = s.cylinder and r.side = s.side
			and r.valve = s.valve and r.measurement = s.measurement and r.measured_at = s.measured_at
		where s.dup and not s.known and s.reason is null`;
}

/** The rank (1-based, by id) of each of `ids` among the batch's readings. */
export async function readingRanks(t: ScopedSql, batchId: string | null, ids: string[]) {
	return t<{ id: string; n: number }[]>`
		select id, n from (select id, (row_number() over (order by id))::int as n from readings where batch_id = ${batchId}) x
		where id = any(${ids}::bigint[])`;
}

/** Rejects each line of `firstLine` as a duplicate of the line it maps to; the lines rejected. */
export async function rejectDuplicates(t: ScopedSql, firstLine: Map<number, number>): Promise<number[]> {
	const rows = await t<{ line: number }[]>`
		update import_stage s set reason = 'the same reading as line ' || d.first || ' (duplicate key in the file)'
		from unnest(${[...firstLine.keys()]}::int[], ${[...firstLine.values()]}::int[]) as d(line, first)
		where s.line = d.line and s.ctid = (select min(x.ctid) from import_stage x where x.line = d.line)
		returning s.line`;
	return rows.map((r) => r.line);
}

/** Rejects rows of a stored head that name another family (compared once per head, not per
 * reading); the lines rejected. */
export async function rejectFamilyMismatches(t: ScopedSql, shopId: string): Promise<number[]> {
	const rows = await t<{ line: number }[]>`
		with mismatch as (
			select d.serial, d.family_id, f.code as head_code, sf.code as file_code
			from (select distinct serial, family_id from import_stage where known and reason is null) d
			join heads h on h.shop_id = ${shopId} and h.serial = d.serial and h.family_id <> d.family_id
			join families f on f.id = h.family_id
			join families sf on sf.id = d.family_id
		)
		update import_stage s set reason = 'head ' || s.serial || ' is a ' || m.head_code || ' head, not ' || m.file_code
		from mismatch m where s.known and s.serial = m.serial and s.family_id = m.family_id and s.reason is null
		returning s.line`;
	return rows.map((r) => r.line);
}

/** Leaves out every reading of `lines` and gives their rejected row a plain rendering of what was
 * read; the number of readings left out. */
export async function dropLines(t: ScopedSql, lines: number[], delimiter: string): Promise<number> {
	const marked = await t`update import_stage set bad = true where line = any(${lines}::int[]) and serial is not null`;
	await t`
		update import_stage set raw = concat_ws(${delimiter}, serial, stage, cylinder, side, valve, measurement, value, measured_at, measured_by)
		where line = any(${lines}::int[]) and reason is not null and raw is null`;
	return marked.count;
}

/** The first rejected lines, for the answer. */
export async function stagedRejects(t: ScopedSql) {
	return t<RejectSample[]>`
		select distinct on (line) line, reason, raw from import_stage where reason is not null order by line limit 50`;
}

/** Of the good staged readings of stored heads, how many are stored already (a dry run's
 * duplicates). */
export async function stagedAlreadyStored(t: ScopedSql): Promise<number> {
	const [would] = await t<{ existing: number }[]>`
		select count(*)::int as existing
		from import_stage s
		join readings r on r.head_id = s.head_id and r.stage = s.stage and r.cylinder = s.cylinder and r.side = s.side
			and r.valve = s.valve and r.measurement = s.measurement and r.measured_at = s.measured_at
		where s.known and s.reason is null and not s.bad`;
	return would.existing;
}

/** Keeps every rejected line of the file with the batch. */
export async function saveRejects(t: ScopedSql, shopId: string, batchId: string): Promise<void> {
	await t`
		insert into import_rejects (shop_id, batch_id, line, raw, reason)
		select distinct on (line) ${shopId}::uuid, ${batchId}::uuid, line, coalesce(raw, ''), reason
		from import_stage where reason is not null order by line`;
}

/** Removes the readings of the batch (those that went straight in before an abort). */
export async function deleteBatchReadings(t: ScopedSql, shopId: string, batchId: string): Promise<void> {
	await t`delete from readings where shop_id = ${shopId} and batch_id = ${batchId}`;
}

export interface BatchCounts {
	hash: string;
	accepted: number;
	rejected: number;
	bytes: number;
}

/** The batch of an import its rejected rows aborted. */
export async function failBatch(t: ScopedSql, batchId: string, message: string, c: BatchCounts): Promise<void> {
	await t`
		update import_batches set status = 'failed', error = ${message}, content_hash = ${c.hash}, rows_accepted = ${c.accepted},
			rows_rejected = ${c.rejected}, bytes = ${c.bytes}, progress_rows = ${c.accepted + c.rejected}, finished_at = now()
		where id = ${batchId}`;
}

/** Inserts the heads the file creates (by serial), from the identity columns of their rows; the
 * number inserted. */
export async function insertNewHeads(t: ScopedSql, shopId: string, batchId: string, newHeads: Map<string, NewHead>): Promise<number> {
	const serials = [...newHeads.keys()];
	const hs = [...newHeads.values()];
	const created = await t`
		insert into heads (id, shop_id, family_id, serial, customer, received_on, mileage_km, status, created_by_batch)
		select i, ${shopId}::uuid, f, s, coalesce(c, ''), a::timestamptz::date, m,
			case when fin = 't' then 'final_check'::head_status else 'inspected'::head_status end, ${batchId}::uuid
		from unnest(${hs.map((h) => h.id)}::uuid[], ${serials}::text[], ${hs.map((h) => h.familyId)}::uuid[], ${hs.map((h) => h.customer)}::text[],
			${hs.map((h) => h.firstAt)}::text[], ${hs.map((h) => h.mileageKm)}::int[], ${hs.map((h) => (h.hasFinal ? 't' : 'f'))}::text[]) as x(i, s, f, c, a, m, fin)`;
	// Many new heads can change the table's size by orders of magnitude (a new shop's first
	// file): fresh statistics keep the foreign-key checks on index scans.
	if (created.count >= 100) await t`analyze heads`;
	return created.count;
}

/** Moves the good staged readings into readings. New heads cannot have stored readings yet: a
 * plain insert. Known heads may: identical readings are skipped (and so counted as duplicates). */
export async function insertStagedReadings(t: ScopedSql, shopId: string, batchId: string): Promise<number> {
	const fresh = await t`
		insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id)
		select ${shopId}::uuid, s.head_id, s.family_id, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.value, s.measured_at, s.measured_by, s.instrument_id, ${batchId}::uuid
		from import_stage s
		where not s.known and s.reason is null and not s.bad`;
	const again = await t`
		insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id)
		select ${shopId}::uuid, s.head_id, s.family_id, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.value, s.measured_at, s.measured_by, s.instrument_id, ${batchId}::uuid
		from import_stage s
		where s.known and s.reason is null and not s.bad
		on conflict on constraint readings_identity_key do nothing`;
	return fresh.count + again.count;
}

/** Deletes the new heads of the batch left without a reading; the number deleted. */
export async function deleteEmptyNewHeads(t: ScopedSql, batchId: string): Promise<number> {
	const gone = await t`
		delete from heads h where h.created_by_batch = ${batchId} and not exists (select 1 from readings r where r.head_id = h.id)`;
	return gone.count;
}

/**
 * The foreign-key checks the replica-mode COPY skipped, for the whole batch at once: every reading
 * of the batch has its head (of its shop and family), its batch and its instrument, and those
 * instruments are locked as the per-row checks would lock them (FOR KEY SHARE), so none can be
 * deleted before the commit. Heads and batch were created by this transaction: nobody else sees
 * them yet. Anything missing aborts the import; nothing of it is kept.
 */
export async function verifyKeys(t: ScopedSql, shopId: string, batchId: string): Promise<void> {
	const [r] = await t<{ readings: number; noHead: number; noBatch: number; noInstrument: number }[]>`
		with k as (
			select shop_id, head_id, family_id, batch_id, instrument_id, count(*) as n
			from readings where batch_id = ${batchId}
			group by 1, 2, 3, 4, 5
		), locked as (
			select i.shop_id, i.id from instruments i
			where i.shop_id = ${shopId} and i.id in (select instrument_id from k)
			for key share
		)
		select coalesce(sum(k.n), 0)::int as readings,
			coalesce(sum(k.n) filter (where h.id is null), 0)::int as "noHead",
			coalesce(sum(k.n) filter (where b.id is null), 0)::int as "noBatch",
			coalesce(sum(k.n) filter (where k.instrument_id is not null and l.id is null), 0)::int as "noInstrument"
		from k
		left join heads h on h.shop_id = k.shop_id and h.id = k.head_id and h.family_id = k.family_id
		left join import_batches b on b.shop_id = k.shop_id and b.id = k.batch_id
		left join locked l on l.shop_id = k.shop_id and l.id = k.instrument_id`;
	const missing = [
		r.noHead && `${r.noHead} without their head`,
		r.noBatch && `${r.noBatch} without their batch`,
		r.noInstrument && `${r.noInstrument} with an instrument not on record`
	].filter(Boolean);
	if (missing.length) throw new Error(`The import was stopped before storing anything: of its ${r.readings} readings, ${missing.join(', ')}.`);
}

export interface CommittedCounts extends BatchCounts {
	layout: string;
	readings: number;
	duplicates: number;
	createdHeads: number;
}

/** The batch of an import that stored its readings, with its counts. */
export async function commitBatch(t: ScopedSql, batchId: string, c: CommittedCounts): Promise<void> {
	await t`
		update import_batches set status = 'committed', content_hash = ${c.hash}, layout = ${c.layout},
			rows_accepted = ${c.accepted}, rows_rejected = ${c.rejected}, readings = ${c.readings},
			duplicates = ${c.duplicates}, created_heads = ${c.createdHeads}, bytes = ${c.bytes},
			progress_rows = ${c.accepted + c.rejected}, finished_at = now()
		where id = ${batchId}`;
}

/** The import's audit row. */
export async function auditImport(t: ScopedSql, shopId: string, actor: { userId: string | null; label: string }, batchId: string, after: Record<string, unknown>): Promise<void> {
	await t`
		insert into audit_log (shop_id, actor_user_id, actor_label, entity, entity_id, action, after)
		values (${shopId}, ${actor.userId}, ${actor.label}, 'import', ${batchId}, 'import',
			${JSON.stringify(after)}::jsonb)`;
}
