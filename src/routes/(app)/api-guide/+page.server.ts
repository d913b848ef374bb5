import { requireRole } from '$lib/server/auth/guards';
import { OPENAPI } from '$lib/server/openapi';
import type { PageServerLoad } from './$types';

type Schema = { type?: string | string[]; enum?: unknown[]; pattern?: string; format?: string };
type Param = { name: string; in: string; required: boolean; description: string; schema: Schema };
type Op = {
	summary: string;
	description?: string;
	tags: string[];
	'x-lapmark-role': string;
	'x-lapmark-example'?: string;
	'x-lapmark-example-body'?: { type: string; data: string };
	parameters: Param[];
	responses: Record<string, { description: string }>;
};

/** A parameter's type in words: its choices, or what kind of text it is. */
function typeText(s: Schema): string {
	if (s.enum) return s.enum.join(' | ');
	if (s.pattern === '^\\d+$') return 'whole number';
	if (s.pattern === '^\\d{4}-\\d{2}-\\d{2}$') return 'date YYYY-MM-DD';
	if (s.format === 'uuid') return 'UUID';
	return 'text';
}

// The guide is the OpenAPI document read for people: one entry per route and method.
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'engineer');
	const operations = Object.entries(OPENAPI.paths as unknown as Record<string, Record<string, Op>>).flatMap(([path, methods]) =>
		Object.entries(methods).map(([method, op]) => ({
			id: `${method}-${path}`.replace(/[^\w]+/g, '-'),
			method: method.toUpperCase(),
			path,
			tag: op.tags[0],
			summary: op.summary,
			description: op.description ?? null,
			role: op['x-lapmark-role'],
			example: op['x-lapmark-example'] ?? null,
			body: op['x-lapmark-example-body'] ?? null,
			parameters: op.parameters.map((p) => ({ name: p.name, where: p.in, required: p.required, description: p.description, type: typeText(p.schema) })),
			responses: Object.entries(op.responses).map(([status, r]) => ({ status, description: r.description }))
		}))
	);
	return { operations, tags: OPENAPI.tags.map((t) => ({ name: t.name, description: t.description })) };
};
