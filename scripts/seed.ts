// Seeds the invented demo shops into DATABASE_URL, prints the demo sign-ins, or writes the
// sample import files.
//
//   npx tsx scripts/seed.ts [--if-empty] [--heads N] [--seed N] [--end-date YYYY-MM-DD]
//   npx tsx scripts/seed.ts --print-signins
//   npx tsx scripts/seed.ts --samples [DIR]        (default datasets/demo)
//
// Stdout carries only the summary (or the table); progress and errors go to stderr.
import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';
import postgres from 'postgres';
import { demoSignIns, type DemoSignIn } from '../src/lib/server/demo/generate';
import { isDatabaseEmpty, seedDemo } from '../src/lib/server/demo/seed';
import { writeSampleFiles } from '../src/lib/server/demo/samples';

function signInTable(rows: DemoSignIn[]): string {
	const head = ['email', 'password', 'role', 'shop', 'API token'];
	const body = rows.map((r) => [r.email, r.password, r.role, r.shop, r.token]);
	const widths = head.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
	const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd();
	return [line(head), line(widths.map((w) => '-'.repeat(w))), ...body.map(line)].join('\n');
}

function fail(message: string, code = 1): never {
	console.error(`[seed] ${message}`);
	process.exit(code);
}

async function main() {
	const { values, positionals } = parseArgs({
		options: {
			'if-empty': { type: 'boolean', default: false },
			heads: { type: 'string' },
			seed: { type: 'string' },
			'end-date': { type: 'string' },
			'print-signins': { type: 'boolean', default: false },
			samples: { type: 'boolean', default: false },
			quiet: { type: 'boolean', default: false }
		},
		allowPositionals: true,
		strict: true
	});
	const seed = values.seed != null ? Number(values.seed) : undefined;
	if (seed != null && !Number.isInteger(seed)) fail('--seed must be an integer', 2);

	if (values['print-signins']) {
		console.log(signInTable(demoSignIns({ seed })));
		return;
	}
	if (values.samples) {
		const dir = positionals[0] ?? fileURLToPath(new URL('../datasets/demo', import.meta.url));
		const files = await writeSampleFiles(dir);
		console.log(`[seed] wrote ${files.length} sample files to ${dir}: ${files.map((f) => `${f.name} (${f.rows} rows)`).join(', ')}`);
		return;
	}

	const url = process.env.DATABASE_URL;
	if (!url) fail('DATABASE_URL is not set', 2);
	const headsTotal = values.heads != null ? Number(values.heads) : undefined;
	if (headsTotal != null && !(Number.isInteger(headsTotal) && headsTotal >= 0)) fail('--heads must be a whole number', 2);
	// Today in UTC: the demo history ends on the day it is seeded.
	const endDate = values['end-date'] ?? new Date().toISOString().slice(0, 10);

	const sql = postgres(url, { max: 1, onnotice: () => {} });
	try {
		if (!(await isDatabaseEmpty(sql))) {
			if (values['if-empty']) {
				console.log('[seed] database already holds shops; demo seed skipped');
				return;
			}
			fail('the database already holds shops; refusing to seed the demo into it (use --if-empty to skip quietly, or a fresh database)');
		}
		const log = values.quiet ? undefined : (m: string) => console.error(`[seed] ${m}`);
		const result = await seedDemo(sql, { seed, endDate, headsTotal, analyze: true, log });
		const c = result.counts;
		const secs = result.elapsedMs / 1000;
		console.log(
			`[seed] demo seeded in ${secs.toFixed(1)} s (+${(result.analyzeMs / 1000).toFixed(1)} s analyze): ` +
				`${c.shops} shops, ${c.users} users, ${c.families} families, ${c.limits} limits, ${c.instruments} instruments, ` +
				`${c.heads} heads, ${c.readings} readings, ${c.decisions} decisions, ${c.cylinderLeakage} leak-down rows; ` +
				`${result.rows} rows, ${Math.round(result.rows / secs)} rows/s`
		);
	} finally {
		await sql.end();
	}
}

main().catch((e) => fail(e instanceof Error ? (e.stack ?? e.message) : String(e)));
