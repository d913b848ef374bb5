// The bulk CSV import against the real database: formats, every kind of bad row with its exact
// counts and reasons, all-or-nothing, duplicates, undo, dry runs, remembered mappings, and an
// upload that dies half way.
import { Readable } from 'node:stream';
import fc from 'fast-check';
import type postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { families, instruments } from '../../src/lib/server/db/schema';
import { directAvailable, reapDeadImports, runImport, verifyKeys, type ImportOptions, type ImportPath } from '../../src/lib/server/import/run';
import { ImportInputError } from '../../src/lib/server/import/text';
import { undoBatch } from '../../src/lib/server/queries/imports';
import { makeShop, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;

beforeAll(async () => {
	const { shop } = await makeShop(db, 'import');
	shopId = shop.id;
	await withShop(db, shopId, async (tx) => {
		// OAK-4: 4 cylinders, 2 intake and 1 exhaust valve per cylinder.
		await tx.insert(families).values({ shopId, code: 'OAK-4', cylinders: 4, intakeValves: 2, exhaustValves: 1 });
		await tx.insert(instruments).values({ shopId, name: 'Bore gauge', kind: 'bore_gauge', serial: 'BG-1', calibratedOn: '2026-01-01', intervalDays: 365 });
	});
});
afterAll(() => sql.end());

const opts = (over: Partial<ImportOptions> = {}): ImportOptions => ({
	shopId,
	actor: { userId: null, label: 'import test' },
	fileName: 'test.csv',
	dryRun: false,
	onReject: 'skip',
	limitBytes: 10 * 1024 * 1024,
	now: new Date('2026-12-01T12:00:00Z'),
	...over
});

const body = (text: string | Buffer, chunk = 7) => {
	const buf = Buffer.isBuffer(text) ? text : Buffer.from(text, 'utf8');
	// Small chunks, so multi-byte characters and lines are split across chunk boundaries.
	const parts: Buffer[] = [];
	for (let i = 0; i < buf.length; i += chunk) parts.push(buf.subarray(i, i + chunk));
	return Readable.from(parts);
};

async function count(table: 'readings' | 'heads', where = sql``) {
	const [r] = await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return t<{ n: number }[]>`select count(*)::int as n from ${t(table)} where shop_id = ${shopId} ${where}`;
	});
	return r.n;
}

async function values(serial: string) {
	return sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return t<{ measurement: string; value: number; side: string; stage: string }[]>`
			select r.measurement, r.value, r.side, r.stage from readings r join heads h on h.id = r.head_id
			where h.serial = ${serial} order by r.measurement, r.side, r.valve`;
	});
}

const WIDE_HEAD = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm,guide_bore_in,seat_width_mm';

describe('formats', () => {
	it('imports a wide file with units per column, converting inches exactly', async () => {
		const csv = [
			WIDE_HEAD,
			'W-1,OAK-4,as_received,1,intake,1,2026-03-02T08:00:00Z,Ana,0.051,0.2165,1.20',
			'W-1,OAK-4,as_received,1,intake,2,2026-03-02T08:00:00Z,Ana,0.049,0.2166,1.25',
			'W-1,OAK-4,as_received,1,exhaust,1,2026-03-02T08:00:00Z,Ana,0.081,,1.90'
		].join('\n');
		const out = await runImport(sql, body(csv), opts());
		expect(out.status).toBe(201);
		expect(out.result).toMatchObject({ accepted: 3, rejected: 0, readings: 8, createdHeads: 1, duplicates: 0 });
		const v = await values('W-1');
		// 0.2165 in × 25.4 = 5.4991 mm (1 in = 25.4 mm exactly, NIST SP 811).
		expect(v.filter((r) => r.measurement === 'guide_bore').map((r) => r.value)).toEqual([5.4991, 5.50164]);
	});

	it('imports the long layout', async () => {
		const csv = [
			'head_serial,family,stage,cylinder,side,valve,measurement,value,unit,measured_at,measured_by',
			'L-1,OAK-4,final,2,in,1,roughness_ra,16,uin,2026-03-03,Ben',
			'L-1,OAK-4,final,2,in,1,vacuum_hold,97.5,pct,2026-03-03,Ben',
			'L-1,OAK-4,final,2,ex,1,fluid_hold,120,s,2026-03-03,Ben'
		].join('\r\n');
		const out = await runImport(sql, body(csv), opts());
		expect(out.result).toMatchObject({ layout: 'long', accepted: 3, readings: 3, createdHeads: 1 });
		expect((await values('L-1')).find((r) => r.measurement === 'roughness_ra')?.value).toBe(0.4064);
	});

	it('reads semicolons with decimal commas, a byte order mark, quoted fields and CRLF', async () => {
		const csv = '\uFEFFhead_serial;family;stage;cylinder;side;valve;measured_at;measured_by;clearance_mm\r\n' + 'S-1;OAK-4;as_received;3;I;1;2026-03-04;"Dana; night shift";0,058\r\n' + '"S-1";OAK-4;as_received;3;I;2;2026-03-04;"Dana ""D"" Ruiz";0,061\r\n';
		const out = await runImport(sql, body(csv, 3), opts());
		expect(out.result).toMatchObject({ accepted: 2, rejected: 0, readings: 2 });
		expect((await values('S-1')).map((r) => r.value)).toEqual([0.058, 0.061]);
	});

	it('reads tab-separated files with multi-byte names split across chunks', async () => {
		const csv = WIDE_HEAD.replaceAll(',', '\t') + '\n' + ['T-1', 'OAK-4', 'final', '4', 'e', '1', '2026-03-05', 'Zoë Ñúñez', '0.045', '', ''].join('\t') + '\n';
		const out = await runImport(sql, body(csv, 5), opts());
		expect(out.result).toMatchObject({ accepted: 1, readings: 1 });
	});
});

describe('bad rows: exact counts and reasons, nothing partial', () => {
	const header = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm,roughness_ra_um,vacuum_hold_pct';
	const good = (n: number) => `B-1,OAK-4,as_received,1,intake,${n},2026-03-06T08:00:00Z,Cy,0.05,,`;
	const file = [
		header,
		good(1), // line 2
		'B-1,NOPE-9,as_received,1,intake,1,2026-03-06,Cy,0.05,,', // unknown family
		'B-1,OAK-4,as_received,9,intake,1,2026-03-06,Cy,0.05,,', // cylinder outside layout
		'B-1,OAK-4,as_received,1,exhaust,2,2026-03-06,Cy,0.05,,', // valve outside layout
		'B-1,OAK-4,as_received,2,intake,1,2026-03-06,Cy,zero,,', // not a number
		'B-1,OAK-4,as_received,2,intake,2,2026-03-06,Cy,-0.01,,', // negative
		'B-1,OAK-4,as_received,3,intake,1,2026-03-06,Cy,1.5,,', // clearance over 1 mm
		'B-1,OAK-4,final,3,intake,2,2026-03-06,Cy,,51,', // Ra over 50 µm
		'B-1,OAK-4,final,4,intake,1,2026-03-06,Cy,,,100.5', // hold over 100 %
		'B-1,OAK-4,as_received,4,intake,2,2031-01-01,Cy,0.05,,', // future date
		good(1), // line 12: duplicate of line 2
		good(2) // line 13
	].join('\n');

	it('skips them when asked, with a reason each', async () => {
		const before = await count('readings');
		const out = await runImport(sql, body(file), opts({ onReject: 'skip', fileName: 'bad.csv' }));
		expect(out.status).toBe(201);
		expect(out.result).toMatchObject({ accepted: 2, rejected: 10, readings: 2, createdHeads: 1 });
		expect(out.result.rejects.map((r) => [r.line, r.reason])).toEqual([
			[3, 'unknown family "NOPE-9"'],
			[4, 'cylinder 9 is outside OAK-4 (cylinders 1–4)'],
			[5, 'exhaust valve 2 is outside OAK-4 (exhaust valves 1–1)'],
			[6, 'clearance_mm: "zero" is not a number'],
			[7, 'clearance_mm: negative value -0.01'],
			[8, 'clearance_mm: 1.5 mm is not physically possible for stem-to-guide clearance (at most 1 mm)'],
			[9, 'roughness_ra_um: 51 um is not physically possible for surface roughness ra (at most 50 um)'],
			[10, 'vacuum_hold_pct: 100.5 pct is not physically possible for vacuum hold (at most 100 %)'],
			[11, 'measured_at 2031-01-01 is in the future'],
			[12, 'the same reading as line 2 (duplicate key in the file)']
		]);
		expect(out.result.rejects[0].raw).toBe('B-1,NOPE-9,as_received,1,intake,1,2026-03-06,Cy,0.05,,');
		expect(await count('readings')).toBe(before + 2);
	});

	it('aborts the whole file when asked, writing no reading and no head', async () => {
		const readings = await count('readings');
		const heads = await count('heads');
		const out = await runImport(sql, body(file.replaceAll('B-1', 'B-2')), opts({ onReject: 'abort', fileName: 'bad-abort.csv' }));
		expect(out.status).toBe(422);
		expect(out.result).toMatchObject({ accepted: 2, rejected: 10, readings: 0, createdHeads: 0 });
		expect(await count('readings')).toBe(readings);
		expect(await count('heads')).toBe(heads);
		// The failed batch keeps its rejects for download.
		const [b] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t`select status, error, (select count(*)::int from import_rejects r where r.batch_id = b.id) as rejects from import_batches b where id = ${out.result.batchId}`;
		});
		expect(b).toMatchObject({ status: 'failed', rejects: 10 });
		expect(b.error).toMatch(/10 rows rejected; nothing was imported/);
	});

	it('rejects a row whose head already belongs to another family', async () => {
		await runImport(sql, body(`${WIDE_HEAD}\nF-1,OAK-4,as_received,1,intake,1,2026-03-07,Cy,0.05,,`), opts());
		await withShop(db, shopId, (tx) => tx.insert(families).values({ shopId, code: 'ASH-6', cylinders: 6, intakeValves: 1, exhaustValves: 1 }));
		const out = await runImport(sql, body(`${WIDE_HEAD}\nF-1,ASH-6,as_received,1,intake,1,2026-03-08,Cy,0.05,,`), opts());
		expect(out.result.rejects[0].reason).toBe('head F-1 is a OAK-4 head, not ASH-6');
	});
});

describe('whole-file problems answer clearly and change nothing', () => {
	it.each([
		['a binary file', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00, 0x08]), 415, /binary/],
		['an empty file', Buffer.alloc(0), 422, /empty/],
		['a header only', Buffer.from(WIDE_HEAD + '\n'), 422, /header but no rows/],
		['10,000 columns', Buffer.from(Array.from({ length: 10_000 }, (_, i) => `c${i}`).join(',') + '\n' + '1,'.repeat(9_999) + '1\n'), 422, /10000 columns/],
		['Latin-1 bytes', Buffer.from([...Buffer.from(WIDE_HEAD + '\nX,OAK-4,final,1,i,1,2026-01-01,Jos'), 0xe9, 0x0a]), 415, /not UTF-8/],
		['unknown columns', Buffer.from('serial,fam\nA,B\n'), 422, /Columns not understood/]
	])('%s', async (_name, bytes, status, message) => {
		const readings = await count('readings');
		const err = await runImport(sql, body(bytes), opts()).catch((e) => e);
		expect(err).toBeInstanceOf(ImportInputError);
		expect(err.status).toBe(status);
		expect(err.message).toMatch(message);
		expect(await count('readings')).toBe(readings);
	});

	it('refuses a file over the size limit', async () => {
		const big = WIDE_HEAD + '\n' + 'Z-1,OAK-4,final,1,i,1,2026-01-01,Cy,0.05,,\n'.repeat(2000);
		const err = await runImport(sql, body(big, 4096), opts({ limitBytes: 20_000 })).catch((e) => e);
		expect(err.status).toBe(413);
		expect(await count('heads', sql`and serial = 'Z-1'`)).toBe(0);
	});
});

describe('duplicates, dry runs, undo', () => {
	const csv = `${WIDE_HEAD}\nD-1,OAK-4,as_received,2,intake,1,2026-03-09T10:00:00Z,Eve,0.052,0.2166,1.3\nD-1,OAK-4,as_received,2,intake,2,2026-03-09T10:00:00Z,Eve,0.055,,1.3\n`;

	it('a dry run reports what would happen and writes nothing', async () => {
		const readings = await count('readings');
		const out = await runImport(sql, body(csv), opts({ dryRun: true }));
		expect(out.status).toBe(200);
		expect(out.result).toMatchObject({ batchId: null, accepted: 2, rejected: 0, readings: 5, createdHeads: 1 });
		expect(await count('readings')).toBe(readings);
	});

	it('refuses the same file twice and names the batch that holds it', async () => {
		const first = await runImport(sql, body(csv), opts());
		expect(first.status).toBe(201);
		const again = await runImport(sql, body(csv), opts());
		expect(again.status).toBe(409);
		expect(again.result.duplicateOf).toBe(first.result.batchId);
	});

	it('reports overlapping rows of a different file as duplicates and changes nothing', async () => {
		const overlap = csv + 'D-1,OAK-4,as_received,3,intake,1,2026-03-09T10:00:00Z,Eve,0.060,,\n';
		const out = await runImport(sql, body(overlap), opts());
		expect(out.result).toMatchObject({ accepted: 3, readings: 1, duplicates: 5, createdHeads: 0 });
	});

	it('undoes a batch: its readings and the heads it created go, once', async () => {
		const out = await runImport(sql, body(`${WIDE_HEAD}\nU-1,OAK-4,final,1,e,1,2026-03-10,Fay,0.04,,1.5\n`), opts());
		expect(await count('heads', sql`and serial = 'U-1'`)).toBe(1);
		const undo = await withShop(db, shopId, (tx) => undoBatch(tx, shopId, out.result.batchId!));
		expect(undo).toEqual({ ok: true, readingsRemoved: 2, headsRemoved: 1 });
		expect(await count('heads', sql`and serial = 'U-1'`)).toBe(0);
		const twice = await withShop(db, shopId, (tx) => undoBatch(tx, shopId, out.result.batchId!));
		expect(twice).toMatchObject({ ok: false, status: 409 });
	});

	it('keeps a head on undo when another batch still has readings on it', async () => {
		const a = await runImport(sql, body(`${WIDE_HEAD}\nK-1,OAK-4,as_received,1,i,1,2026-03-11,Gus,0.05,,\n`), opts());
		await runImport(sql, body(`${WIDE_HEAD}\nK-1,OAK-4,final,1,i,1,2026-03-12,Gus,0.03,,\n`), opts());
		const undo = await withShop(db, shopId, (tx) => undoBatch(tx, shopId, a.result.batchId!));
		expect(undo).toEqual({ ok: true, readingsRemoved: 1, headsRemoved: 0 });
	});
});

describe('column mapping', () => {
	const header = 'Serial No,Family,Stage,Cyl,Side,Valve,Date,Inspector,Clearance (in),Notes';
	const line = (v: number) => `M-1,OAK-4,as_received,1,in,${v},2026-03-13,Hal,0.0021,looks fine`;

	it('asks for a mapping when headers do not match', async () => {
		const err = await runImport(sql, body(`${header}\n${line(1)}\n`), opts()).catch((e) => e);
		expect(err.status).toBe(422);
		// "Clearance (in)" reads as clearance_in by itself; the others need a person.
		expect(err.details.unmatched).toEqual(['Serial No', 'Cyl', 'Date', 'Inspector', 'Notes']);
	});

	it('applies a mapping and remembers it for the next file with the same headers', async () => {
		const mapping = { 'Serial No': 'head_serial', Cyl: 'cylinder', Date: 'measured_at', Inspector: 'measured_by', Notes: 'ignore' };
		const out = await runImport(sql, body(`${header}\n${line(1)}\n`), opts({ mapping }));
		expect(out.result).toMatchObject({ accepted: 1, readings: 1 });
		const next = await runImport(sql, body(`${header}\n${line(2)}\n`), opts());
		expect(next.result).toMatchObject({ accepted: 1, readings: 1 });
		// 0.0021 in = 0.05334 mm
		expect((await values('M-1')).map((r) => r.value)).toEqual([0.05334, 0.05334]);
	});
});

describe('an upload that dies half way', () => {
	it('leaves nothing and marks the batch failed', async () => {
		const readings = await count('readings');
		async function* dying() {
			yield Buffer.from(`${WIDE_HEAD}\n`);
			for (let i = 1; i <= 500; i++) yield Buffer.from(`X-${i},OAK-4,as_received,1,i,1,2026-03-14,Ida,0.05,,\n`);
			throw Object.assign(new Error('aborted'), { code: 'ECONNRESET' });
		}
		const err = await runImport(sql, Readable.from(dying()), opts({ fileName: 'dies.csv' })).catch((e) => e);
		expect(err).toBeInstanceOf(ImportInputError);
		expect(err.message).toMatch(/interrupted/);
		expect(await count('readings')).toBe(readings);
		expect(await count('heads', sql`and serial like 'X-%'`)).toBe(0);
		const [b] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t`select status, error from import_batches where shop_id = ${shopId} and file_name = 'dies.csv'`;
		});
		expect(b).toMatchObject({ status: 'failed' });
	});

	it('a batch left running by a dead import is marked failed; a live one is not', async () => {
		const [b] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t<{ id: string }[]>`
				insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status, created_at)
				values (${shopId}, 'ghost.csv', '', 'wide', 'abort', 'running', now() - interval '1 hour') returning id`;
		});
		expect(await reapDeadImports(sql, 0)).toBeGreaterThanOrEqual(1);
		const [after] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t`select status, error from import_batches where id = ${b.id}`;
		});
		expect(after.status).toBe('failed');
		expect(after.error).toMatch(/stopped before it finished/);
	});
});

describe('any valid file imports completely (property)', () => {
	it('accepts every generated row and stores every value', async () => {
		const rowArb = fc.record({
			cylinder: fc.integer({ min: 1, max: 4 }),
			side: fc.constantFrom('intake', 'exhaust', 'IN', 'ex', 'i', 'E'),
			valveSeed: fc.integer({ min: 0, max: 1 }),
			stage: fc.constantFrom('as_received', 'final'),
			clearance: fc.integer({ min: 0, max: 999 }),
			bore: fc.integer({ min: 1000, max: 3000 }),
			minute: fc.integer({ min: 0, max: 59 })
		});
		await fc.assert(
			fc.asyncProperty(fc.uniqueArray(rowArb, { minLength: 1, maxLength: 40, selector: (r) => `${r.cylinder}|${r.side.toLowerCase()[0]}|${r.valveSeed}|${r.stage}|${r.minute}` }), fc.integer({ min: 1, max: 1e9 }), async (rows, tag) => {
				const serial = `P-${tag}`;
				const lines = rows.map((r) => {
					const exhaust = r.side.toLowerCase().startsWith('e');
					const valve = exhaust ? 1 : r.valveSeed + 1;
					return `${serial},OAK-4,${r.stage},${r.cylinder},${r.side},${valve},2026-04-01T10:${String(r.minute).padStart(2, '0')}:00Z,Prop,${(r.clearance / 1000).toFixed(3)},${(r.bore / 10000).toFixed(4)},`;
				});
				const out = await runImport(sql, body(`${WIDE_HEAD}\n${lines.join('\n')}\n`, 64), opts({ fileName: `${serial}.csv` }));
				expect(out.result.rejected).toBe(0);
				expect(out.result.accepted).toBe(rows.length);
				expect(out.result.readings).toBe(rows.length * 2);
			}),
			{ numRuns: 15 }
		);
	});
});

describe('two ways into readings: straight in (COPY as the import role) and staged', () => {
	// Readings of heads a file creates go by COPY straight into readings while the file is read;
	// rows that need a check across rows (a stored head, a key seen before) and rejected rows go
	// through the staging table. The staged way alone is what a server without the import role
	// gets. Both must give the same answer and store the same readings.
	const head = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm,seat_width_mm';
	const file = [
		head,
		'N-1,OAK-4,as_received,1,intake,1,2026-05-04T08:00:00Z,Ivy,0.051,1.2', // 2: new head, straight in
		'N-1,OAK-4,as_received,1,intake,2,2026-05-04T08:00:00Z,Ivy,0.052,1.3', // 3
		'N-2,OAK-4,as_received,2,intake,1,2026-05-04T09:00:00Z,Ivy,0.053,', // 4
		'N-1,OAK-4,as_received,1,intake,1,2026-05-04T08:00:00Z,Ivy,0.051,', // 5: same reading as line 2
		'N-2,ASH-6,as_received,3,intake,1,2026-05-04T09:00:00Z,Ivy,0.054,', // 6: N-2 is an OAK-4 head (line 4)
		'N-3,OAK-4,final,1,exhaust,1,2026-05-05T08:00:00Z,Ivy,1.7,', // 7: impossible clearance
		'K-9,OAK-4,final,1,intake,1,2026-05-06T08:00:00Z,Ivy,0.030,', // 8: stored head, new reading
		'K-9,OAK-4,as_received,1,intake,1,2026-05-01T08:00:00Z,Ivy,0.060,', // 9: stored already (a duplicate, not a reject)
		'K-9,OAK-4,final,1,intake,1,2026-05-06T08:00:00Z,Ivy,0.031,', // 10: same reading as line 8
		'N-1,OAK-4,as_received,2,intake,1,2026-05-04T08:00:00Z,Ivy,0.055,1.3', // 11
		'N-1,OAK-4,as_received,1,intake,2,2026-05-04T08:00:00Z,Ivy,,1.4', // 12: seat width as line 3 → whole row out
		'N-4,OAK-4,final,4,exhaust,1,2026-05-07T08:00:00Z,Ivy,0.061,1.9' // 13
	].join('\n');

	async function run(way: ImportPath) {
		const { shop } = await makeShop(db, `way-${way}`);
		const o = (over: Partial<ImportOptions> = {}) => opts({ shopId: shop.id, direct: way !== 'staged', replica: way === 'direct-replica', ...over });
		await withShop(db, shop.id, (tx) =>
			tx.insert(families).values([
				{ shopId: shop.id, code: 'OAK-4', cylinders: 4, intakeValves: 2, exhaustValves: 1 },
				{ shopId: shop.id, code: 'ASH-6', cylinders: 6, intakeValves: 1, exhaustValves: 1 }
			])
		);
		const first = await runImport(sql, body(`${head}\nK-9,OAK-4,as_received,1,intake,1,2026-05-01T08:00:00Z,Ivy,0.060,`), o({ fileName: 'first.csv' }));
		expect(first.status).toBe(201);
		const out = await runImport(sql, body(file, 64), o());
		const stored = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shop.id}, true)`;
			return t`
				select h.serial, f.code, r.stage, r.cylinder, r.side, r.valve, r.measurement, r.value, r.measured_at
				from readings r join heads h on h.id = r.head_id join families f on f.id = r.family_id
				order by 1, 3, 4, 5, 6, 7, 9`;
		});
		return { shop, out, stored };
	}

	it('give the same counts, reasons and stored readings', async () => {
		const replica = await run('direct-replica');
		const direct = await run('direct');
		const staged = await run('staged');
		expect(staged.out.result.path).toBe('staged');
		if (await importRoleThere()) {
			expect(replica.out.result.path).toBe('direct-replica');
			expect(direct.out.result.path).toBe('direct');
		}
		for (const way of [replica, direct, staged]) {
			expect(way.out.status).toBe(201);
			expect(way.out.result).toMatchObject({ accepted: 7, rejected: 5, readings: 10, duplicates: 1, createdHeads: 3 });
			expect(way.out.result.rejects.map((r) => [r.line, r.reason])).toEqual([
				[5, 'the same reading as line 2 (duplicate key in the file)'],
				[6, 'head N-2 is a OAK-4 head, not ASH-6'],
				[7, 'clearance_mm: 1.7 mm is not physically possible for stem-to-guide clearance (at most 1 mm)'],
				[10, 'the same reading as line 8 (duplicate key in the file)'],
				[12, 'the same reading as line 3 (duplicate key in the file)']
			]);
			// 1 stored before + lines 2 (2 readings), 3 (2), 4 (1), 8 (1), 11 (2), 13 (2).
			expect(way.stored).toHaveLength(11);
		}
		expect(direct.stored).toEqual(staged.stored);
		expect(replica.stored).toEqual(staged.stored);
	});

	it('takes the staged way on a server where the import role may not insert readings', async () => {
		const there = await importRoleThere();
		const ways = await waysBeforeAndAfter(async (t) => {
			if (there) await t`revoke insert on readings from lapmark_import`;
		});
		expect(ways).toEqual([
			{ direct: there, replica: there },
			{ direct: false, replica: false }
		]);
	});

	it('keeps every row\'s foreign-key checks when a summary trigger would not fire in replica mode', async () => {
		const there = await importRoleThere();
		const ways = await waysBeforeAndAfter((t) => t`alter table readings enable trigger readings_stats_insert`); // origin mode only
		expect(ways).toEqual([
			{ direct: there, replica: there },
			{ direct: there, replica: false }
		]);
	});

	it('stops an import whose readings, loaded without per-row checks, lack their head, batch or instrument', async () => {
		if (!(await importRoleThere())) return;
		const failure = await sql
			.begin(async (t) => {
				await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
				const [fam] = await t<{ id: string }[]>`select id from families where shop_id = ${shopId} and code = 'OAK-4'`;
				const [batch] = await t<{ id: string }[]>`
					insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status)
					values (${shopId}, 'keys.csv', 'keys', 'wide', 'skip', 'running') returning id`;
				// What a faulty direct way would write: readings of a head and an instrument nobody stored.
				await t`set local role lapmark_import`;
				await t`set local session_replication_role = replica`;
				await t`
					insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id)
					select ${shopId}::uuid, gen_random_uuid(), ${fam.id}::uuid, 'as_received', 1, 'intake', v, 'clearance', 0.05, now(), 'Jo',
						case when v = 2 then gen_random_uuid() end, ${batch.id}::uuid
					from generate_series(1, 2) v`;
				await t`set local session_replication_role = origin`;
				await t`reset role`;
				await verifyKeys(t, shopId, batch.id);
				return null;
			})
			.catch((e: Error) => e.message);
		expect(failure).toBe('The import was stopped before storing anything: of its 2 readings, 2 without their head, 1 with an instrument not on record.');
	});

	it('when rejected rows abort, a reject found only at the end leaves nothing of the file', async () => {
		const readings = await count('readings');
		const heads = await count('heads');
		const [sums] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t`select count(*)::int as n, coalesce(sum(n), 0)::int as total from reading_value_counts`;
		});
		const rows = Array.from({ length: 300 }, (_, i) => `LATE-${i >> 3},OAK-4,final,${(i % 4) + 1},intake,${((i >> 2) % 2) + 1},2026-06-0${1 + ((i >> 3) % 9)}T08:00:00Z,Jo,0.0${10 + (i % 80)},,`);
		rows.push(rows[17]); // line 302 repeats line 19: known only once the whole file is read
		const out = await runImport(sql, body(`${WIDE_HEAD}\n${rows.join('\n')}\n`, 512), opts({ onReject: 'abort', fileName: 'late.csv' }));
		expect(out.status).toBe(422);
		expect(out.result).toMatchObject({ accepted: 300, rejected: 1, readings: 0, createdHeads: 0 });
		expect(out.result.rejects).toEqual([{ line: 302, reason: 'the same reading as line 19 (duplicate key in the file)', raw: expect.any(String) }]);
		expect(await count('readings')).toBe(readings);
		expect(await count('heads')).toBe(heads);
		const [after] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			return t`select count(*)::int as n, coalesce(sum(n), 0)::int as total from reading_value_counts`;
		});
		expect(after).toEqual(sums);
	});
});

/** The ways into readings before and after a change made inside a transaction that is rolled
 * back: no other session sees it. */
async function waysBeforeAndAfter(change: (t: postgres.TransactionSql) => Promise<unknown>) {
	return sql
		.begin(async (t) => {
			const before = await directAvailable(t);
			await change(t);
			throw Object.assign(new Error('roll back'), { ways: [before, await directAvailable(t)] });
		})
		.catch((e) => e.ways);
}

async function importRoleThere() {
	const [r] = await sql`select exists (select 1 from pg_roles where rolname = 'lapmark_import') as there`;
	return r.there as boolean;
}
