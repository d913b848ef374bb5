// The layers of the code, checked over every import in src (TypeScript, JavaScript and the script
// blocks of Svelte files; `$lib/…` aliases and relative paths alike). TypeScript's own
// preProcessFile reads the imports (static, dynamic, re-exports, type-only), so this test does not
// depend on a hand-written parser of import syntax.
//
//   routes (pages, actions, API handlers) → services → queries → db
//   stats: pure; $lib/domain and $lib/contract: browser-safe; components: never server code
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(__dirname, '..');
const SRC = join(ROOT, 'src');

function walk(dir: string): string[] {
	return readdirSync(dir).flatMap((name) => {
		const p = join(dir, name);
		return statSync(p).isDirectory() ? walk(p) : /\.(ts|js|svelte)$/.test(name) ? [p] : [];
	});
}

/** Source files, tests excluded (a test may reach into any layer). */
const FILES = walk(SRC)
	.map((p) => relative(ROOT, p))
	.filter((p) => !/\.(spec|e2e)\.ts$/.test(p))
	.sort();

function scriptOf(file: string, text: string): string {
	if (!file.endsWith('.svelte')) return text;
	return [...text.matchAll(/<script\b[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]).join('\n');
}

/** A module specifier as a path relative to the checkout (src/…), or null for a package. */
function target(file: string, spec: string): string | null {
	if (spec.startsWith('$lib/') || spec === '$lib') return join('src/lib', spec.slice(5));
	if (spec.startsWith('.')) return relative(ROOT, resolve(ROOT, dirname(file), spec));
	return null;
}

export function importsOf(file: string): string[] {
	const text = scriptOf(file, readFileSync(join(ROOT, file), 'utf8'));
	const info = ts.preProcessFile(text, true, true);
	return info.importedFiles.map((f) => f.fileName).filter((s) => !s.endsWith('/$types') && s !== './$types');
}

const EDGES = FILES.flatMap((file) => importsOf(file).flatMap((spec) => {
	const to = target(file, spec);
	return to ? [{ file, spec, to }] : [];
}));

const under = (path: string, folder: string) => path === folder || path.startsWith(folder + '/') || path.startsWith(folder + '.');

type Rule = { name: string; from: (f: string) => boolean; forbidden: string[] };

const isRoute = (f: string) => under(f, 'src/routes');
const isClient = (f: string) => f.endsWith('.svelte') || under(f, 'src/lib/components') || under(f, 'src/lib/api') || /\.svelte\.ts$/.test(f) || /\/\+page\.ts$|\/\+layout\.ts$/.test(f);

const RULES: Rule[] = [
	{ name: 'routes reach the database only through services', from: isRoute, forbidden: ['src/lib/server/db', 'src/lib/server/queries'] },
	{ name: 'routes call the import through its service', from: isRoute, forbidden: ['src/lib/server/import'] },
	{ name: 'server code never imports the browser fetch helpers', from: (f) => under(f, 'src/lib/server') || f === 'src/hooks.server.ts', forbidden: ['src/lib/api'] },
	{ name: 'statistics are pure', from: (f) => under(f, 'src/lib/server/stats'), forbidden: ['src/lib/server/db', 'src/lib/server/queries', 'src/lib/server/services', 'src/lib/server/import'] },
	// Queries may use the import's types and pure helpers (a header's signature, the import role's
	// name), never the service layer or the import's orchestration.
	{ name: 'queries do not call services', from: (f) => under(f, 'src/lib/server/queries'), forbidden: ['src/lib/server/services', 'src/lib/server/import/run', 'src/lib/server/import/finish', 'src/lib/server/import/batch'] },
	{ name: 'components and browser code never import server code', from: isClient, forbidden: ['src/lib/server'] },
	{ name: 'the domain rules and the response contract are browser-safe', from: (f) => under(f, 'src/lib/domain') || under(f, 'src/lib/contract'), forbidden: ['src/lib/server', 'src/lib/api', 'src/lib/components'] }
];

describe('the import graph', () => {
	it('reads imports of every kind, in .ts and .svelte files, through $lib aliases and relative paths', () => {
		// Known edges: if the reader missed one of these, every rule below would pass vacuously.
		const of = (f: string) => EDGES.filter((e) => e.file === f).map((e) => e.to);
		expect(of('src/hooks.server.ts')).toContain('src/lib/server/auth/access');
		expect(of('src/lib/server/db/index.ts')).toContain('src/lib/server/db/client');
		expect(of('src/routes/(app)/+layout.svelte').length).toBeGreaterThan(0);
		expect(FILES.filter((f) => f.endsWith('.svelte')).length).toBeGreaterThan(40);
		// The rule matcher sees a forbidden edge when there is one.
		const probe = { file: 'src/routes/x/+page.server.ts', to: 'src/lib/server/db/scope' };
		expect(RULES[0].from(probe.file) && RULES[0].forbidden.some((b) => under(probe.to, b))).toBe(true);
		expect(under('src/lib/server/dbx', 'src/lib/server/db')).toBe(false);
	});

	for (const rule of RULES) {
		it(rule.name, () => {
			const broken = EDGES.filter((e) => rule.from(e.file) && rule.forbidden.some((b) => under(e.to, b))).map((e) => `${e.file} → ${e.spec}`);
			expect(broken).toEqual([]);
		});
	}
});

describe('one scope mechanism', () => {
	const text = (f: string) => readFileSync(join(ROOT, f), 'utf8');
	it('routes never open a shop transaction themselves', () => {
		expect(FILES.filter((f) => isRoute(f) && /\bwith(Shop|System)(Sql)?\(/.test(text(f)))).toEqual([]);
	});
	it('only db/scope.ts sets the tenancy settings', () => {
		expect(FILES.filter((f) => f !== 'src/lib/server/db/scope.ts' && /set_config\(\s*'lapmark/.test(text(f)))).toEqual([]);
	});
});
