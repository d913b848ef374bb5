// The OpenAPI document against the code: every /api/v1 route of the access policy (which
// access.spec.ts keeps equal to src/routes) is described with each of its methods and the same
// least role, and each query parameter list is the one its route's schema accepts.
import { describe, expect, it } from 'vitest';
import { POLICY } from './auth/access';
import { OPENAPI, openApiPath } from './openapi';

type Op = { 'x-lapmark-role': string; parameters: { name: string; in: string; required: boolean; schema: Record<string, unknown>; description: string }[]; responses: Record<string, unknown> };
const paths = OPENAPI.paths as unknown as Record<string, Record<string, Op>>;
const apiRoutes = Object.entries(POLICY).filter(([id]) => id.startsWith('/api/v1/'));

describe('the OpenAPI document', () => {
	it('is OpenAPI 3.1 with bearer authentication', () => {
		expect(OPENAPI.openapi).toBe('3.1.0');
		expect(OPENAPI.components.securitySchemes.bearer).toMatchObject({ type: 'http', scheme: 'bearer' });
	});

	it.each(apiRoutes)('describes %s with every method and its least role', (id, policy) => {
		const path = paths[openApiPath(id)];
		expect(path, `add ${openApiPath(id)} to src/lib/server/openapi.ts`).toBeDefined();
		for (const [method, least] of Object.entries(policy)) {
			const op = path[method.toLowerCase()];
			expect(op, `${method} ${id}`).toBeDefined();
			expect(op['x-lapmark-role']).toBe(least);
			expect(op.responses).toHaveProperty(method === 'POST' && id.endsWith('/imports') ? '201' : '200');
		}
		expect(Object.keys(path).length).toBe(Object.keys(policy).length);
	});

	it('describes no route the app does not have', () => {
		const known = new Set(apiRoutes.map(([id]) => openApiPath(id)));
		for (const p of Object.keys(paths)) expect(known.has(p), p).toBe(true);
	});

	it('takes each parameter list from the route schema, with a description for each', () => {
		const readings = paths['/api/v1/readings'].get.parameters;
		expect(readings.map((p) => p.name)).toEqual(['family', 'side', 'stage', 'from', 'to', 'machinist', 'customer', 'mileageMin', 'mileageMax', 'measurement', 'format', 'page', 'pageSize', 'sort']);
		expect(readings.find((p) => p.name === 'format')!.schema).toEqual({ type: 'string', enum: ['csv', 'json'] });
		expect(readings.every((p) => !p.required)).toBe(true);
		const rates = paths['/api/v1/stats/rates'].get.parameters;
		expect(rates.find((p) => p.name === 'check')!.required).toBe(true);
		const check = paths['/api/v1/check'].get.parameters;
		expect(check.filter((p) => p.required).map((p) => p.name)).toEqual(['family', 'side', 'measurement', 'value']);
		for (const op of Object.values(paths).flatMap((p) => Object.values(p))) for (const p of op.parameters) expect(p.description, p.name).not.toBe('');
	});

	it('serialises to JSON and back unchanged (no functions, no undefined)', () => {
		expect(JSON.parse(JSON.stringify(OPENAPI))).toEqual(OPENAPI);
	});

	it('generates every answer from $lib/contract: the fields the figures have, and no others', () => {
		const schemas = OPENAPI.components.schemas as Record<string, { properties?: Record<string, unknown> }>;
		const fields = (name: string) => Object.keys(schemas[name].properties ?? {});
		expect(fields('DistributionResponse')).toEqual(expect.arrayContaining(['iqr', 'madScaled', 'tukeyOutside', 'limits', 'outside', 'limitsAsOf', 'source']));
		expect(fields('CapabilityResponse')).toEqual(expect.arrayContaining(['cp', 'cpk', 'cpu', 'cpl', 'pp', 'ppk', 'sdWithin', 'sdOverall']));
		expect(fields('ControlResponse')).toEqual(expect.arrayContaining(['mrBar', 'mrUcl', 'mrLcl', 'specLimits', 'beyondLimits', 'mrBeyondLimits']));
		expect(fields('WearResponse')).toEqual(expect.arrayContaining(['residualSd', 'slopeSePer10000Km', 'sampled']));
		expect(schemas.RateCell).toEqual({
			type: 'object',
			properties: {
				failures: { type: 'integer', minimum: 0, maximum: 9007199254740991 },
				n: { type: 'integer', minimum: 0, maximum: 9007199254740991 },
				rate: { description: 'failures / n; null when n = 0.', type: ['number', 'null'] },
				ci95: { description: '95 % Wilson score interval.', $ref: '#/components/schemas/Interval' }
			},
			required: ['failures', 'n', 'rate', 'ci95'],
			additionalProperties: false
		});
		// Every fixed object is closed: an answer with a field the contract lacks fails validation.
		const open: string[] = [];
		const walk = (node: unknown, at: string) => {
			if (!node || typeof node !== 'object') return;
			const o = node as Record<string, unknown>;
			if (o.type === 'object' && o.properties && o.additionalProperties !== false) open.push(at);
			for (const [k, v] of Object.entries(o)) walk(v, `${at}/${k}`);
		};
		walk(schemas, '#/components/schemas');
		expect(open).toEqual([]);
	});

	it('answers each successful JSON response with a schema of the contract', () => {
		for (const [path, methods] of Object.entries(paths)) {
			for (const [method, op] of Object.entries(methods)) {
				for (const [status, r] of Object.entries(op.responses as Record<string, { content?: Record<string, { schema: Record<string, unknown> }> }>)) {
					const schema = r.content?.['application/json']?.schema;
					if (!schema || path === '/api/v1/openapi.json') continue;
					const refs = '$ref' in schema ? [schema] : ((schema.oneOf ?? schema.anyOf) as Record<string, unknown>[]);
					for (const ref of refs) expect(String(ref.$ref), `${method} ${path} ${status}`).toMatch(/^#\/components\/schemas\/\w+$/);
				}
			}
		}
	});
});
