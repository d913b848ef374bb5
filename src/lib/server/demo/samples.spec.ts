// The sample import files: deterministic, the committed copies up to date, each file the size
// and shape its README promises.
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { sampleFiles } from './samples';

const files = sampleFiles();
const byName = new Map(files.map((f) => [f.name, f]));
const parse = (name: string, delimiter = ',') =>
	Papa.parse<Record<string, string>>(byName.get(name)!.content, { header: true, skipEmptyLines: true, delimiter }).data;

describe('sample files', () => {
	it('are the same on every call and match the committed copies in datasets/demo', () => {
		expect(sampleFiles()).toEqual(files);
		for (const f of files) {
			const committed = readFileSync(new URL(`../../../../datasets/demo/${f.name}`, import.meta.url), 'utf8');
			expect(committed, `${f.name} is stale: run npx tsx scripts/seed.ts --samples`).toBe(f.content);
		}
	});

	it('hold 50–500 data rows each', () => {
		for (const f of files.filter((x) => x.name.endsWith('.csv'))) {
			expect(f.rows).toBeGreaterThanOrEqual(50);
			expect(f.rows).toBeLessThanOrEqual(500);
		}
	});

	it('keep clearance = bore − stem in the wide files, in mm and in inches', () => {
		const check = (rows: Record<string, string>[], u: 'mm' | 'in', comma = false) => {
			const num = (s: string) => Number(comma ? s.replace(',', '.') : s);
			for (const r of rows) {
				const diff = num(r[`guide_bore_${u}`]) - num(r[`stem_diameter_${u}`]) - num(r[`clearance_${u}`]);
				expect(Math.abs(diff)).toBeLessThan(1e-9);
			}
		};
		check(parse('wide-mm.csv'), 'mm');
		check(parse('wide-inch.csv'), 'in');
		check(parse('semicolon-decimal-comma.csv', ';'), 'mm', true);
	});

	it('use only new serials, the demo families and the long layout units', () => {
		const families = new Set(['ALDER-4', 'BIRCH-6', 'CEDAR-V8', 'DOGWOOD-4D', 'ELM-3', 'FIR-6D']);
		for (const name of ['wide-mm.csv', 'wide-inch.csv', 'long.csv']) {
			for (const r of parse(name)) {
				expect(r.head_serial).toMatch(/^[A-Z]{3}\d{2}-S\d{4}$/);
				expect(families.has(r.family)).toBe(true);
			}
		}
		const units = new Set(parse('long.csv').map((r) => r.unit));
		expect([...units].sort()).toEqual(['in', 'mm', 'pct', 's', 'uin', 'um']);
	});

	it('spoil exactly the lines the README lists in with-errors.csv', () => {
		const readme = byName.get('README.md')!.content;
		const lines = [...readme.matchAll(/^- line (\d+):/gm)].map((m) => Number(m[1]));
		expect(lines).toHaveLength(5);
		const text = byName.get('with-errors.csv')!.content.split('\n');
		expect(text[lines[0] - 1]).toContain('OAK-9');
		expect(text[lines[1] - 1].split(',')[3]).toBe('7');
		expect(text[lines[2] - 1]).toMatch(/\d\.\d\dO,/);
		expect(text[lines[3] - 1]).toContain('2099-');
		const key = (l: string) => l.split(',').slice(0, 7).join(',');
		expect(key(text[lines[4] - 1])).toBe(key(text[lines[4] - 2]));
	});
});
