import { describe, expect, it } from 'vitest';
import { POLICY, lowerRole, operationOf, roleAtLeast } from './access';
import { listRoutes } from './routes';

const routes = listRoutes(new URL('../../../routes', import.meta.url).pathname);

describe('access policy table', () => {
	it('finds the routes', () => {
		expect(routes.length).toBeGreaterThan(3);
		expect(routes.map((r) => r.id)).toContain('/api/health');
	});

	it.each(routes.map((r) => [r.id, r] as const))('has an entry for every operation of %s', (_id, route) => {
		const policy = POLICY[route.id];
		expect(policy, `route ${route.id} is missing from POLICY in access.ts`).toBeDefined();
		for (const op of route.operations) {
			expect(policy[op], `${route.id} ${op} is missing from POLICY`).toBeDefined();
		}
	});

	it('has no entry for a route that does not exist', () => {
		const ids = new Set(routes.map((r) => r.id));
		for (const id of Object.keys(POLICY)) expect(ids.has(id), `POLICY lists ${id}, which is not a route`).toBe(true);
	});

	it('ranks roles owner > engineer > machinist > viewer', () => {
		expect(roleAtLeast('owner', 'engineer')).toBe(true);
		expect(roleAtLeast('machinist', 'engineer')).toBe(false);
		expect(roleAtLeast('viewer', 'viewer')).toBe(true);
		expect(lowerRole('owner', 'machinist')).toBe('machinist');
	});

	it('names form actions from the query string', () => {
		expect(operationOf('POST', '?/password', true)).toBe('action:password');
		expect(operationOf('POST', '', true)).toBe('action:default');
		expect(operationOf('POST', '?/password', false)).toBe('POST');
		expect(operationOf('HEAD', '', false)).toBe('GET');
	});
});
