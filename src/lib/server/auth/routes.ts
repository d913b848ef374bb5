// Lists the app's routes and the operations each one serves, read from src/routes. Used by the
// access tests to keep the policy table complete.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import type { Operation } from './access';

export interface RouteInfo {
	id: string;
	operations: Operation[];
	kind: 'page' | 'endpoint';
}

const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;

export function listRoutes(routesDir: string): RouteInfo[] {
	const out: RouteInfo[] = [];
	const walk = (dir: string) => {
		const names = readdirSync(dir);
		const id = '/' + relative(routesDir, dir).split(sep).filter(Boolean).join('/');
		const ops = new Set<Operation>();
		let kind: RouteInfo['kind'] | null = null;
		if (names.includes('+page.svelte') || names.includes('+page.server.ts')) {
			kind = 'page';
			ops.add('GET');
			if (names.includes('+page.server.ts')) {
				const src = readFileSync(join(dir, '+page.server.ts'), 'utf8');
				const block = /export const actions[^=]*=\s*\{([\s\S]*)\};?\s*$/m.exec(src)?.[1];
				if (block) {
					// Top-level keys of the actions object: `name: async` or `default: …`.
					for (const m of block.matchAll(/^\t(\w+):/gm)) ops.add(`action:${m[1]}`);
				}
			}
		}
		if (names.includes('+server.ts')) {
			kind = kind ?? 'endpoint';
			const src = readFileSync(join(dir, '+server.ts'), 'utf8');
			for (const m of METHODS) {
				if (new RegExp(`export (const|async function|function) ${m}\\b`).test(src)) ops.add(m);
			}
		}
		if (kind) out.push({ id: id === '/' ? '/' : id, operations: [...ops], kind });
		for (const n of names) {
			const p = join(dir, n);
			if (statSync(p).isDirectory()) walk(p);
		}
	};
	walk(routesDir);
	return out.sort((a, b) => a.id.localeCompare(b.id));
}
