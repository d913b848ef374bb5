// npm run bench:import — BENCH_READINGS (default 1,000,000) readings in a wide CSV through the API's own import path
// (POST /api/v1/imports on the built app), against `psql \copy` of the same readings as a long
// CSV into a scratch table with the same columns and indexes, in the same run. Also the long
// layout through the API. Prints readings/s, the ratio and the server's peak RSS, and ends with
// one line of JSON. On a machine shared with other work the seconds wander from run to run, so it
// also prints the CPU seconds each side used (the app server and its database sessions; psql and
// its database session), which do not depend on how busy the machine is.
import { spawn, spawnSync, execFileSync } from 'node:child_process';
import { createWriteStream, createReadStream, mkdirSync, readFileSync, statSync } from 'node:fs';
import { once } from 'node:events';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import postgres from 'postgres';
import { newApiToken, sha256Hex } from '../src/lib/server/auth/tokens';

const url = process.env.DATABASE_URL!;
const psql = process.env.PSQL ?? 'psql';
const READINGS = Number(process.env.BENCH_READINGS ?? 1_000_000);
const out = join(import.meta.dirname, 'out');
mkdirSync(out, { recursive: true });
const sql = postgres(url, { max: 2, onnotice: () => {} });

const MEASURES = ['stem_diameter_mm', 'guide_bore_mm', 'clearance_mm', 'face_runout_mm', 'seat_runout_mm', 'seat_width_mm', 'margin_mm', 'roughness_ra_um'];
const CYL = 8;
const VALVES = 2;

async function setUp() {
	const token = newApiToken();
	await sql.begin(async (t) => {
		await t`select set_config('lapmark.system', 'on', true)`;
		const [shop] = await t`insert into shops (name, slug) values ('Bench shop', 'bench-shop') returning id`;
		const [family] = await t`insert into families (shop_id, code, cylinders, intake_valves, exhaust_valves) values (${shop.id}, 'BENCH-8', ${CYL}, ${VALVES}, ${VALVES}) returning id`;
		// Limit versions for every measurement of the file, each stage and side, two versions
		// (the second from the middle of the file's dates), as a shop's families have them: the
		// rates triggers (drizzle/0013) then judge every reading the import writes.
		await t`
			insert into limits (shop_id, family_id, measurement, side, stage, min, max, effective_from)
			select ${shop.id}, ${family.id}, v.m::measurement, sd::side, st::stage, v.mn, case when v.mx is not null then greatest(coalesce(v.mn, 0), v.mx * f) end, ef::date
			from (values ('stem_diameter', 6.94, 6.99), ('guide_bore', null, 7.1), ('clearance', null, 0.1), ('face_runout', null, 0.04),
				('seat_runout', null, 0.05), ('seat_width', 1.2, 1.9), ('margin', 1.1, null), ('roughness_ra', null, 0.6)) v(m, mn, mx),
				unnest(array['intake', 'exhaust']) sd, unnest(array['as_received', 'final']) st,
				(values ('2024-01-01', 1.0), ('2025-09-01', 0.99)) e(ef, f)`;
		const [u] = await t`insert into "user" (id, email, name) values (gen_random_uuid()::text, 'bench@bench.example', 'Bench') returning id`;
		await t`insert into memberships (shop_id, user_id, role) values (${shop.id}, ${u.id}, 'engineer')`;
		await t`insert into api_tokens (shop_id, user_id, name, prefix, token_hash, role) values (${shop.id}, ${u.id}, 'bench', ${token.slice(0, 10)}, ${sha256Hex(token)}, 'engineer')`;
	});
	return token;
}

/** A deterministic wide file: one row per head × stage × position, eight measurements a row. */
async function writeWide(path: string) {
	const w = createWriteStream(path);
	w.write(`head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,${MEASURES.join(',')}\n`);
	let readings = 0;
	let x = 12345;
	const rnd = () => ((x = (x * 1103515245 + 12345) % 2147483648) / 2147483648);
	let head = 0;
	let buf = '';
	while (readings < READINGS) {
		head++;
		const day = new Date(Date.UTC(2025, 0, 1) + (head % 600) * 86_400_000).toISOString().slice(0, 10);
		for (const stage of ['as_received', 'final']) {
			for (let c = 1; c <= CYL; c++) {
				for (const side of ['intake', 'exhaust']) {
					for (let v = 1; v <= VALVES; v++) {
						if (readings >= READINGS) break;
						const stem = (6.95 + rnd() * 0.03).toFixed(3);
						const clr = (0.02 + rnd() * 0.1).toFixed(3);
						const bore = (Number(stem) + Number(clr)).toFixed(3);
						buf += `BH-${head},BENCH-8,${stage},${c},${side},${v},${day}T08:00:00Z,Bench,${stem},${bore},${clr},${(rnd() * 0.05).toFixed(3)},${(rnd() * 0.06).toFixed(3)},${(1 + rnd()).toFixed(2)},${(1 + rnd()).toFixed(2)},${(0.2 + rnd() * 0.5).toFixed(2)}\n`;
						readings += MEASURES.length;
						if (buf.length > 1 << 20) {
							if (!w.write(buf)) await once(w, 'drain');
							buf = '';
						}
					}
				}
			}
		}
	}
	w.end(buf);
	await once(w, 'finish');
	return readings;
}

function startServer(port: number) {
	const server = spawn('node', ['server.js'], {
		env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: `http://127.0.0.1:${port}`, BODY_SIZE_LIMIT: 'Infinity', LAPMARK_UPLOAD_LIMIT_MB: '2000' },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	return server;
}

async function waitUp(base: string) {
	for (let i = 0; i < 150; i++) {
		try {
			if ((await fetch(`${base}/api/health`)).ok) return;
		} catch {
			/* not yet */
		}
		await new Promise((r) => setTimeout(r, 200));
	}
	throw new Error('server did not start');
}

function peakRssMb(pid: number): number {
	const status = readFileSync(`/proc/${pid}/status`, 'utf8');
	const kb = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
	return Math.round(kb / 1024);
}

async function upload(base: string, token: string, path: string, layout: 'wide' | 'long') {
	const t0 = performance.now();
	const res = await fetch(`${base}/api/v1/imports?layout=${layout}&onReject=abort&fileName=${layout}.csv`, {
		method: 'POST',
		headers: { authorization: `Bearer ${token}`, 'content-type': 'text/csv', 'content-length': String(statSync(path).size) },
		body: Readable.toWeb(createReadStream(path)) as ReadableStream,
		duplex: 'half'
	} as RequestInit);
	const body = await res.json();
	const seconds = (performance.now() - t0) / 1000;
	if (res.status !== 201) throw new Error(`import answered ${res.status}: ${JSON.stringify(body).slice(0, 500)}`);
	return { seconds, body };
}

const CLK_TCK = Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim()) || 100;

/** User + system CPU seconds from the text of /proc/<pid>/stat. */
function cpuFromStat(stat: string): number {
	const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
	return (Number(fields[11]) + Number(fields[12])) / CLK_TCK;
}

/** CPU seconds a process has used so far; 0 once it is gone. */
function cpuOf(pid: number): number {
	try {
		return cpuFromStat(readFileSync(`/proc/${pid}/stat`, 'utf8'));
	} catch {
		return 0;
	}
}

/** CPU seconds used so far by the app server and by its database sessions. */
async function serverCpu(pid: number) {
	const sessions = await sql<{ pid: number }[]>`select pid from pg_stat_activity where application_name = 'lapmark' and datname = current_database()`;
	return { node: cpuOf(pid), db: new Map(sessions.map((s) => [s.pid, cpuOf(s.pid)])) };
}

async function serverCpuSince(pid: number, before: Awaited<ReturnType<typeof serverCpu>>) {
	const now = await serverCpu(pid);
	let db = 0;
	for (const [session, seconds] of now.db) db += seconds - (before.db.get(session) ?? 0);
	const node = now.node - before.node;
	return { node: round1(node), db: round1(db), total: round1(node + db) };
}

const round1 = (x: number) => Math.round(x * 10) / 10;

/** psql with row-level security opened for this session (the bench reads across the shop). */
function runPsql(command: string) {
	const t0 = performance.now();
	execFileSync(psql, [url, '-X', '-q', '-v', 'ON_ERROR_STOP=1', '-c', "set lapmark.system = 'on'", '-c', command], { stdio: ['ignore', 'ignore', 'inherit'] });
	return (performance.now() - t0) / 1000;
}

/** runPsql for the timed loads: also the CPU seconds of psql and of its database session. */
function runPsqlCounted(command: string) {
	const script = [
		"set lapmark.system = 'on';",
		'select pg_backend_pid() as pid \\gset',
		'\\setenv BENCH_PID :pid',
		`\\! cat /proc/$BENCH_PID/stat > ${out}/psql-session-before.stat`,
		command,
		`\\! cat /proc/$BENCH_PID/stat > ${out}/psql-session-after.stat`
	].join('\n');
	const t0 = performance.now();
	// bash's `times` prints the CPU time of its children (psql) on its second line.
	const run = spawnSync('bash', ['-c', '"$0" "$1" -X -q -v ON_ERROR_STOP=1 -f - && times', psql, url], { input: script, encoding: 'utf8', stdio: ['pipe', 'pipe', 'inherit'] });
	const seconds = (performance.now() - t0) / 1000;
	if (run.status !== 0) throw new Error(`psql failed: ${command}`);
	const children = run.stdout.trim().split('\n').at(-1)!.split(/\s+/).map((t) => {
		const m = /(\d+)m([\d.]+)s/.exec(t);
		return m ? Number(m[1]) * 60 + Number(m[2]) : 0;
	});
	const client = children[0] + children[1];
	const session = (file: string) => cpuFromStat(readFileSync(join(out, file), 'utf8'));
	const db = session('psql-session-after.stat') - session('psql-session-before.stat');
	return { seconds, cpu: { client: round1(client), db: round1(db), total: round1(client + db) } };
}

const token = await setUp();
console.log(`[bench] writing a wide CSV with ${READINGS.toLocaleString('en-US')} readings…`);
const widePath = join(out, 'wide-1m.csv');
const readings = await writeWide(widePath);
console.log(`[bench] ${widePath}: ${(statSync(widePath).size / 1e6).toFixed(1)} MB`);

const port = 3900;
const base = `http://127.0.0.1:${port}`;
const server = startServer(port);
process.on('exit', () => server.kill('SIGKILL'));
await waitUp(base);
let cpuBefore = await serverCpu(server.pid!);
const wide = await upload(base, token, widePath, 'wide');
const wideRss = peakRssMb(server.pid!);
const wideCpu = await serverCpuSince(server.pid!, cpuBefore);
console.log(`[bench] phases (ms): ${JSON.stringify(wide.body.timings)}`);
console.log(`[bench] API import, wide: ${wide.body.readings} readings in ${wide.seconds.toFixed(2)} s = ${Math.round(wide.body.readings / wide.seconds).toLocaleString('en-US')} readings/s (${wide.body.path}); server peak RSS ${wideRss} MB; CPU ${wideCpu.total} s (server ${wideCpu.node} + database ${wideCpu.db})`);

// The same readings as a long CSV of resolved rows, loaded by psql \copy into an identical table.
const longResolved = join(out, 'readings-long.csv');
runPsql(`\\copy (select shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id from readings) to '${longResolved}' csv header`);
const COLS = 'shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id';
runPsql(`create table bench_readings (like readings including defaults including identity including generated including constraints including indexes)`);
const { seconds: psqlSeconds, cpu: psqlCpu } = runPsqlCounted(`\\copy bench_readings (${COLS}) from '${longResolved}' csv header`);
console.log(`[bench] psql \\copy of the same ${readings.toLocaleString('en-US')} readings (long CSV, same columns, checks and indexes): ${psqlSeconds.toFixed(2)} s = ${Math.round(readings / psqlSeconds).toLocaleString('en-US')} readings/s; CPU ${psqlCpu.total} s (psql ${psqlCpu.client} + database ${psqlCpu.db})`);
// The same table with readings' foreign keys too (row-level security cannot be matched: PostgreSQL
// refuses COPY FROM into a table under it, which is why the import stages first).
runPsql(`create table bench_readings_fk (like readings including defaults including identity including generated including constraints including indexes)`);
runPsql(`alter table bench_readings_fk add foreign key (shop_id, head_id, family_id) references heads (shop_id, id, family_id),
	add foreign key (shop_id, instrument_id) references instruments (shop_id, id), add foreign key (shop_id, batch_id) references import_batches (shop_id, id)`);
const { seconds: psqlFkSeconds, cpu: psqlFkCpu } = runPsqlCounted(`\\copy bench_readings_fk (${COLS}) from '${longResolved}' csv header`);
console.log(`[bench] psql \\copy into the same table with readings' foreign keys as well: ${psqlFkSeconds.toFixed(2)} s = ${Math.round(readings / psqlFkSeconds).toLocaleString('en-US')} readings/s; CPU ${psqlFkCpu.total} s`);

// The long layout through the API: the same readings as a user would write them.
const longUser = join(out, 'long-1m.csv');
runPsql(
	`\\copy (select 'L' || h.serial as head_serial, 'BENCH-8' as family, r.stage, r.cylinder, r.side, r.valve, r.measurement, r.value, case when r.measurement = 'roughness_ra' then 'um' else 'mm' end as unit, to_char(r.measured_at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS"Z"') as measured_at, r.measured_by from readings r join heads h on h.id = r.head_id) to '${longUser}' csv header`
);
cpuBefore = await serverCpu(server.pid!);
const long = await upload(base, token, longUser, 'long');
const longRss = peakRssMb(server.pid!);
const longCpu = await serverCpuSince(server.pid!, cpuBefore);
console.log(`[bench] phases, long (ms): ${JSON.stringify(long.body.timings)}`);
console.log(`[bench] API import, long: ${long.body.readings} readings in ${long.seconds.toFixed(2)} s = ${Math.round(long.body.readings / long.seconds).toLocaleString('en-US')} readings/s (${long.body.path}); server peak RSS ${longRss} MB; CPU ${longCpu.total} s (server ${longCpu.node} + database ${longCpu.db})`);

server.kill('SIGTERM');
await once(server, 'exit');
await sql.end();

const rps = Math.round(wide.body.readings / wide.seconds);
const psqlRps = Math.round(readings / psqlSeconds);
const ratio = Math.round((rps / psqlRps) * 100) / 100;
const psqlFkRps = Math.round(readings / psqlFkSeconds);
const ratioFk = Math.round((rps / psqlFkRps) * 100) / 100;
const cpuRatio = Math.round((psqlCpu.total / wideCpu.total) * 100) / 100;
console.log(`[bench] ratio to psql \\copy: ${ratio} (target ≥ 0.5); with foreign keys on both sides: ${ratioFk}; ${wide.body.readings.toLocaleString('en-US')} readings in ${wide.seconds.toFixed(1)} s (target < 30 s at 1,000,000${wide.body.readings === 1_000_000 ? '' : `: ${((wide.seconds * 1_000_000) / wide.body.readings).toFixed(1)} s scaled`}); peak RSS ${wideRss} MB (target < 250 MB)`);
console.log(`[bench] CPU seconds, wide: import ${wideCpu.total}, psql \\copy ${psqlCpu.total} (with foreign keys ${psqlFkCpu.total}); psql's CPU over the import's: ${cpuRatio}`);
console.log(
	JSON.stringify({
		readings: wide.body.readings,
		seconds: Math.round(wide.seconds * 100) / 100,
		readingsPerSecond: rps,
		psqlReadingsPerSecond: psqlRps,
		ratio,
		psqlWithForeignKeysReadingsPerSecond: psqlFkRps,
		ratioWithForeignKeys: ratioFk,
		peakRssMb: wideRss,
		cpuSeconds: { import: wideCpu, psql: psqlCpu, psqlWithForeignKeys: psqlFkCpu, ratio: cpuRatio },
		long: { readings: long.body.readings, seconds: Math.round(long.seconds * 100) / 100, readingsPerSecond: Math.round(long.body.readings / long.seconds), peakRssMb: longRss, cpuSeconds: longCpu }
	})
);
