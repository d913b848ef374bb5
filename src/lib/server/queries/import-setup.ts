// What the import reads and makes on its transaction before the first row: the shop's families
// and instruments and heads, whether the direct way into readings is open, the staging table.
// All of it before the first COPY: the connection takes no other query while it is in COPY mode.
import type { ScopedSql } from '../db/scope';
import { IMPORT_ROLE } from '../import/copy-channel';
import type { FamilyLayout, RowContext } from '../import/rows';

/** What the row checks need: families by code, instruments by name or serial. */
export async function loadRowContext(t: ScopedSql, shopId: string, decimalComma: boolean, now: Date): Promise<RowContext> {
	const fams = await t<FamilyLayout[]>`
		select id, code, cylinders, intake_valves as "intakeValves", exhaust_valves as "exhaustValves"
		from families where shop_id = ${shopId}`;
	const insts = await t<{ id: string; name: string; serial: string }[]>`select id, name, serial from instruments where shop_id = ${shopId}`;
	const instruments = new Map<string, string>();
	for (const i of insts) {
		instruments.set(i.name.toLowerCase(), i.id);
		instruments.set(i.serial.toLowerCase(), i.id);
	}
	return {
		families: new Map(fams.map((f) => [f.code.toLowerCase(), f])),
		instruments,
		decimalComma,
		latest: now.getTime() + 5 * 60_000
	};
}

/** The shop's heads by serial. */
export async function knownSerials(t: ScopedSql, shopId: string): Promise<Map<string, { id: string }>> {
	const rows = await t<{ serial: string; id: string }[]>`select serial, id from heads where shop_id = ${shopId}`;
	return new Map(rows.map((r) => [r.serial, { id: r.id }]));
}

/** Whether this connection may take the direct way (the role is there, bypasses row-level
 * security, may insert readings and may be switched to, and the head check can wait for commit),
 * and whether that role may load in replica mode, without per-row foreign-key checks. */
export async function directAvailable(t: ScopedSql): Promise<{ direct: boolean; replica: boolean }> {
	const [r] = await t<{ direct: boolean; replica: boolean }[]>`
		select coalesce((
			select r.rolbypassrls and pg_has_role(current_user, r.oid, 'MEMBER') and has_table_privilege(r.oid, 'readings', 'INSERT')
			from pg_roles r where r.rolname = ${IMPORT_ROLE}
		), false) and coalesce((
			select condeferrable from pg_constraint where conname = 'readings_head_fk' and conrelid = 'readings'::regclass
		), false) as direct,
		coalesce((
			select has_parameter_privilege(r.oid, 'session_replication_role', 'SET') from pg_roles r where r.rolname = ${IMPORT_ROLE}
		), false) and not exists (
			-- every summary trigger must fire in replica mode (drizzle/0007)
			select 1 from pg_trigger where tgrelid = 'readings'::regclass and tgname like 'readings_stats_%' and tgenabled <> 'A'
		) as replica`;
	return { direct: r.direct, replica: r.direct && r.replica };
}

/** The staging table of this transaction: rows that need a check across rows, rejected rows, and
 * (the staged way) every row. */
export async function createStage(t: ScopedSql): Promise<void> {
	await t.unsafe(`create temp table import_stage (
		line int not null, serial text, head_id uuid, family_id uuid, stage stage, cylinder smallint, side side, valve smallint,
		measurement measurement, value double precision, measured_at timestamptz, measured_by text,
		instrument_id uuid, mileage integer, customer text, reason text, raw text,
		known boolean not null default false, dup boolean not null default false, bad boolean not null default false
	) on commit drop`);
}

/** New heads are inserted after their readings (import/finish.ts): the readings' head check waits
 * for the commit. */
export async function deferHeadCheck(t: ScopedSql): Promise<void> {
	await t`set constraints readings_head_fk deferred`;
}
