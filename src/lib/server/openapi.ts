// The OpenAPI 3.1 description of Lapmark's JSON API (/api/v1/*), served at /api/v1/openapi.json
// and read by the API guide page. Only the paths and their words are written here: every answer's
// schema is generated from the zod schemas of $lib/contract (zod's JSON Schema output, draft
// 2020-12, the dialect of OpenAPI 3.1) and every query parameter from the schema its route
// validates with, so the document cannot drift from what the routes accept and answer.
// openapi.spec.ts checks that every /api/v1 route of the access policy is here with each of its
// methods; tests/e2e/api-contract.e2e.ts validates real answers of every route against it.
import { z } from 'zod';
import {
	CapabilityMachinistsResponse,
	CapabilityResponse,
	CheckResponse,
	ComebacksResponse,
	FirstPassResponse,
	CompareResponse,
	contract,
	ControlResponse,
	PChartResponse,
	DescribeResponse,
	DistributionResponse,
	ErrorBody,
	FamiliesResponse,
	HeaderAdvice,
	HeaderRefusal,
	ImportAnswer,
	ImportDetail,
	ImportList,
	ImportUndone,
	MeResponse,
	OutliersResponse,
	OverviewResponse,
	RatesResponse,
	ReadingsExport,
	ReadingsPage,
	WearResponse
} from '$lib/contract';
import type { Role } from '$lib/measurements';
import { DECISION_KINDS } from '$lib/measurements';
import { READINGS_MAX_PAGE_SIZE, readingsQuerySchema } from '$lib/schemas/readings';
import {
	DESCRIBE_MAX_VALUES,
	capabilityQuerySchema,
	firstPassQuerySchema,
	checkQuerySchema,
	comebacksQuerySchema,
	compareQuerySchema,
	controlQuerySchema,
	pchartQuerySchema,
	distributionQuerySchema,
	outliersQuerySchema,
	ratesQuerySchema,
	wearQuerySchema
} from '$lib/schemas/stats';
import { importListSchema, importQuerySchema } from '$lib/schemas/imports';

type Json = Record<string, unknown>;

/** Every named schema of the contract as a component, `$ref`s between them pointing here. */
function componentSchemas(): Record<string, Json> {
	const { schemas } = z.toJSONSchema(contract, { target: 'draft-2020-12', io: 'output', uri: (id) => `#/components/schemas/${id}` });
	return Object.fromEntries(Object.entries(schemas).map(([id, { $schema: _s, $id: _i, ...schema }]) => [id, schema as Json]));
}

/** A reference to a contract schema's component. */
function ref(schema: z.ZodType): Json {
	const id = contract.get(schema)?.id;
	if (!id) throw new Error('openapi: a response schema is not registered in $lib/contract (named())');
	return { $ref: `#/components/schemas/${id}` };
}
const json = (schema: Json, description: string) => ({ description, content: { 'application/json': { schema } } });
/** An answer whose body is `schema`. */
const answer = (schema: z.ZodType, description: string) => json(ref(schema), description);
const problem = (description: string) => answer(ErrorBody, description);
const csv = (description: string) => ({ description, content: { 'text/csv': { schema: { type: 'string' } } } });

/** What each query parameter means; the types come from the route's schema. */
const PARAMETER_TEXT: Record<string, string> = {
	family: 'Engine family code, such as ALDER-4.',
	side: 'Valve side.',
	stage: 'as_received (measured on arrival) or final (after the work).',
	from: 'First day of measured_at, UTC, inclusive (YYYY-MM-DD).',
	to: 'Last day of measured_at, UTC, inclusive (YYYY-MM-DD).',
	machinist: 'Who measured (case-insensitive, whole name).',
	customer: "The head's customer (case-insensitive, whole name).",
	mileageMin: "Lowest head mileage in km (heads without a mileage are left out when a mileage filter is given).",
	mileageMax: 'Highest head mileage in km.',
	measurement: 'The measurement key.',
	value: 'The value to check, in `unit` (a point as decimal separator).',
	unit: 'Unit of `value`; default the measurement’s canonical unit (mm, µm as um, % as pct, s).',
	page: 'Page number, from 1.',
	pageSize: 'Rows per page.',
	sort: 'Sort key; a leading minus sorts descending.',
	check: `What counts as a failure: a measurement key (a reading outside the limits of its day; seal tests included), or decision:<kind> with kind one of ${DECISION_KINDS.join(', ')}.`,
	limit: 'How many of the most recent readings to chart (the control limits do not depend on it: they come from the baseline).',
	rules: 'Run rules to test, comma-separated: we1–we4 (Western Electric), n1–n8 (Nelson), or the sets we, nelson, all (none: no rule). Default we.',
	format: 'csv or json (default json). Leave out `page` to export every row.',
	layout: 'wide (one column per measurement) or long (one row per reading); guessed from the header when left out.',
	dryRun: 'Check the file without storing anything (1 or true).',
	onReject: 'abort (a rejected row stops the import: nothing is stored) or skip (store the good rows, report the rejected ones). Left out: the shop’s setting `onReject`, shown on the Imports page (`abort` for a shop that has none); the answer’s `onReject` and `onRejectFrom` say which applied.',
	fileName: 'Name to show in the import list.',
	clientRef: 'Your own reference (8–64 letters, digits, - or _), to find an import that is still running.',
	mapping: 'JSON object of file header → Lapmark column name, for headers the import does not recognise.'
};

type ZodObjectLike = { shape: Record<string, z.ZodType> };

function queryParameters(schema: ZodObjectLike): Json[] {
	return Object.entries(schema.shape).map(([name, field]) => {
		const { $schema: _s, ...type } = z.toJSONSchema(field, { io: 'input', unrepresentable: 'any' }) as Json;
		return {
			name,
			in: 'query',
			required: !field.safeParse(undefined).success,
			description: PARAMETER_TEXT[name] ?? '',
			schema: type
		};
	});
}


/** The answers every operation can give besides its own. */
function standardErrors(role: Role | 'public'): Json {
	if (role === 'public') return {};
	return {
		'400': problem('A parameter is missing or not valid; the message names it and says what to send.'),
		'401': problem('No valid session or token.'),
		'403': problem(`The token or user holds less than the ${role} role.`)
	};
}

interface Operation {
	summary: string;
	description?: string;
	role: Role | 'public';
	tag: string;
	query?: ZodObjectLike;
	path?: Json[];
	requestBody?: Json;
	responses: Json;
	/** Query string (or body) for the guide's curl example. */
	example?: string;
	exampleBody?: { type: string; data: string };
}

function operation(id: string, o: Operation): Json {
	return {
		operationId: id,
		summary: o.summary,
		...(o.description ? { description: o.description } : {}),
		tags: [o.tag],
		...(o.role === 'public' ? { security: [] } : {}),
		'x-lapmark-role': o.role,
		...(o.example !== undefined ? { 'x-lapmark-example': o.example } : {}),
		...(o.exampleBody ? { 'x-lapmark-example-body': o.exampleBody } : {}),
		parameters: [...(o.path ?? []), ...(o.query ? queryParameters(o.query) : [])],
		...(o.requestBody ? { requestBody: o.requestBody } : {}),
		responses: { ...o.responses, ...standardErrors(o.role) }
	};
}

const idParam = { name: 'id', in: 'path', required: true, description: 'The import batch id (UUID).', schema: { type: 'string', format: 'uuid' } };
const readingColumns = ['head_serial', 'family', 'customer', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'unit', 'measured_at', 'measured_by', 'instrument', 'mileage_km', 'batch'];
const noFamily = problem('No such family.');

export const OPENAPI = {
	openapi: '3.1.0',
	info: {
		title: 'Lapmark API',
		version: '1',
		description:
			'Readings, imports and statistics of one shop. Authenticate with `Authorization: Bearer lmk_…` (make a token under Shop → API tokens; it acts with the lower of its own role and its creator’s) or a signed-in session. Every answer covers the token’s shop only. Errors are JSON `{ "message": "…" }`.'
	},
	servers: [{ url: '/' }],
	security: [{ bearer: [] }, { session: [] }],
	tags: [
		{ name: 'Account', description: 'Who you are.' },
		{ name: 'Readings', description: 'The stored readings, filtered and exported.' },
		{ name: 'Statistics', description: 'Distributions, outliers, rates, capability and control charts computed where the data lives.' },
		{ name: 'Imports', description: 'CSV files of readings in, and undone.' },
		{ name: 'Shop', description: 'Families, limits and the overview figures.' }
	],
	paths: {
		'/api/v1/me': {
			get: operation('me', { summary: 'Who the token or session acts as', role: 'viewer', tag: 'Account', example: '', responses: { '200': answer(MeResponse, 'The user, shop and role.') } })
		},
		'/api/v1/openapi.json': {
			get: operation('openapi', { summary: 'This document', role: 'public', tag: 'Account', example: '', responses: { '200': json({ type: 'object', required: ['openapi', 'info', 'paths', 'components'] }, 'OpenAPI 3.1.') } })
		},
		'/api/v1/readings': {
			get: operation('readings', {
				summary: 'Readings, filtered: a whole export (CSV or JSON) or one page',
				description: `Without \`page\`: every reading the filters select, oldest first, streamed (CSV columns: ${readingColumns.join(', ')}; JSON: an array of Reading). Text cells of the CSV that start with = + - @, a tab or a carriage return are prefixed with ' so a spreadsheet shows them instead of running them. With \`page\`: one page of JSON (pageSize up to ${READINGS_MAX_PAGE_SIZE}, default 50), sorted by \`sort\` (default -measuredAt).`,
				role: 'engineer',
				tag: 'Readings',
				query: readingsQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&measurement=clearance&stage=as_received&from=2026-01-01&format=csv',
				responses: {
					'200': {
						description: 'The export (with Content-Disposition: attachment; filename=…), or one page.',
						content: {
							'text/csv': { schema: { type: 'string' } },
							'application/json': { schema: { oneOf: [ref(ReadingsExport), ref(ReadingsPage)] } }
						}
					},
					'404': problem('The family is not one of the shop’s; the message lists them.')
				}
			})
		},
		'/api/v1/check': {
			get: operation('check', {
				summary: 'One reading against its limits and the fleet, with a suggested decision',
				role: 'viewer',
				tag: 'Statistics',
				query: checkQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&side=exhaust&measurement=clearance&value=0.0045&unit=in',
				responses: { '200': answer(CheckResponse, 'The verdict, the fleet figures and the suggested decision with its rule in words.'), '404': problem('No such family in the shop.') }
			})
		},
		'/api/v1/stats/distribution': {
			get: operation('distribution', {
				summary: 'Summary and histogram of one measurement',
				role: 'viewer',
				tag: 'Statistics',
				query: distributionQuerySchema as unknown as ZodObjectLike,
				example: 'measurement=clearance&family=ALDER-4&side=exhaust&stage=as_received',
				responses: { '200': answer(DistributionResponse, 'n, mean, sd, quantiles, MAD, fences, histogram, the limits in force on limitsAsOf, the readings outside the limits of their own day (outside) and, separately, outside the limits in force on limitsAsOf (outsideAsOf).'), '404': noFamily }
			})
		},
		'/api/v1/stats/compare': {
			get: operation('compare', {
				summary: 'Every family side by side for one measurement, sorted by median',
				role: 'viewer',
				tag: 'Statistics',
				query: compareQuerySchema as unknown as ZodObjectLike,
				example: 'measurement=clearance&side=exhaust&stage=as_received',
				responses: { '200': answer(CompareResponse, 'One summary per family.') }
			})
		},
		'/api/v1/stats/outliers': {
			get: operation('outliers', {
				summary: 'Unusual readings, each with every reason, paged and sorted',
				description: 'A reading is listed when it is outside the limits of its day, outside its group’s Tukey fences, or its modified z-score is beyond 3.5.',
				role: 'viewer',
				tag: 'Statistics',
				query: outliersQuerySchema as unknown as ZodObjectLike,
				example: 'measurement=clearance&side=exhaust&sort=-z&page=1&pageSize=20',
				responses: { '200': answer(OutliersResponse, 'One page of flagged readings.'), '404': noFamily }
			})
		},
		'/api/v1/stats/rates': {
			get: operation('rates', {
				summary: 'Shares of valve positions outside limits or given a decision, by side, family and cylinder, intake against exhaust',
				description:
					"Per valve position: the positions the check counts (`failures`: outside the limits of their day, or given the decision), n, the share and its 95 % Wilson interval; the intake-vs-exhaust difference with the Miettinen–Nurminen score test and the 95 % interval obtained by inverting it, so the verdict (from the interval) and p always agree; p is never 0 (below 1e-15 it is that bound, `pBelow`). Without `stage` a measurement is judged at its default stage and the answer says so (`check.stageDefaulted`).",
				role: 'viewer',
				tag: 'Statistics',
				query: ratesQuerySchema as unknown as ZodObjectLike,
				example: 'check=clearance&stage=as_received',
				responses: { '200': answer(RatesResponse, 'Rates with intervals and the side test.'), '404': noFamily }
			})
		},
		'/api/v1/stats/comebacks': {
			get: operation('comebacks', { summary: 'Released heads and how many came back, per family', role: 'viewer', tag: 'Statistics', query: comebacksQuerySchema as unknown as ZodObjectLike, example: 'from=2026-01-01', responses: { '200': answer(ComebacksResponse, 'Comeback rates with Wilson intervals.'), '404': noFamily } })
		},
		'/api/v1/stats/first-pass': {
			get: operation('firstPass', {
				summary: 'First-pass yield: heads whose final check passed without a second round, per family and machinist',
				description:
					'A head passes first time when the first final reading of every position × measurement is within the limits of its day and none was read again (a retest is a second round). Shares with 95 % Wilson intervals; the machinist is who took the head’s first final reading, the dates are that reading’s day.',
				role: 'viewer',
				tag: 'Statistics',
				query: firstPassQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&from=2026-01-01',
				responses: { '200': answer(FirstPassResponse, 'First-pass yield with Wilson intervals.'), '404': noFamily }
			})
		},
		'/api/v1/stats/capability': {
			get: operation('capability', {
				summary: 'Process capability of final readings against the final limits: Cp/Cpk, Pp/Ppk with intervals, observed and predicted share outside, normality and the percentile method',
				role: 'viewer',
				tag: 'Statistics',
				query: capabilityQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&side=intake&measurement=seat_width',
				responses: { '200': answer(CapabilityResponse, 'Capability with a verdict in words.'), '404': noFamily, '422': problem('The limits leave no tolerance.') }
			})
		},
		'/api/v1/stats/capability/machinists': {
			get: operation('capabilityByMachinist', {
				summary: 'Capability per machinist, side by side: each machinist’s final readings judged alone, with Bissell’s Cpk intervals',
				role: 'viewer',
				tag: 'Statistics',
				query: capabilityQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&side=exhaust&measurement=vacuum_hold',
				responses: { '200': answer(CapabilityMachinistsResponse, 'One capability per machinist.'), '404': noFamily, '422': problem('The limits leave no tolerance.') }
			})
		},
		'/api/v1/stats/control': {
			get: operation('control', {
				summary: 'Individuals and moving-range chart with limits from a fixed baseline, run rules and EWMA',
				description:
					'The limits come from the baseline period an engineer chose on the quality page ("recompute"), or, when none was chosen, from the first 100 readings of the series; they do not change with `limit` or the filters. Limits beyond the quantity’s physical bounds are clipped to them (`uclClipped`, `lclClipped`). `rules` picks the run rules: we1–we4 (Western Electric), n1–n8 (Nelson), or the sets `we`, `nelson`, `all` (default `we`).',
				role: 'viewer',
				tag: 'Statistics',
				query: controlQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&side=intake&measurement=seat_width&stage=final&limit=200&rules=we,n2,n3',
				responses: { '200': answer(ControlResponse, 'Centre line and limits of the baseline, the points, every rule break by rule, and the EWMA.'), '404': noFamily }
			})
		},
		'/api/v1/stats/pchart': {
			get: operation('pchart', {
				summary: 'p-chart: monthly share of valve positions outside the limits of their day',
				description:
					'A valve position fails when any of its readings of the series is outside the limits in force on its day; it counts in every month whose readings judge it (by those readings). Limits p̄ ± 3·√(p̄(1 − p̄)/nᵢ) for each month’s n (NIST/SEMATECH e-Handbook §6.3.3.2), the lower one no lower than 0. Without `side`, both sides.',
				role: 'viewer',
				tag: 'Statistics',
				query: pchartQuerySchema as unknown as ZodObjectLike,
				example: 'family=ALDER-4&measurement=vacuum_hold&side=exhaust',
				responses: { '200': answer(PChartResponse, 'The months with their shares and limits.'), '404': noFamily }
			})
		},
		'/api/v1/stats/wear': {
			get: operation('wear', { summary: 'A measurement against head mileage: least-squares line and 95 % band', role: 'viewer', tag: 'Statistics', query: wearQuerySchema as unknown as ZodObjectLike, example: 'measurement=clearance&side=exhaust&family=ALDER-4', responses: { '200': answer(WearResponse, 'The fit and up to 5,000 points.'), '404': noFamily } })
		},
		'/api/v1/stats/describe': {
			post: operation('describe', {
				summary: 'Summary statistics of numbers you send',
				role: 'viewer',
				tag: 'Statistics',
				requestBody: { required: true, content: { 'application/json': { schema: { type: 'array', items: { type: 'number' }, maxItems: DESCRIBE_MAX_VALUES } } } },
				exampleBody: { type: 'application/json', data: '[0.051, 0.048, 0.062, 0.055]' },
				responses: { '200': answer(DescribeResponse, 'The same summary as a distribution, plus the lag-1 autocorrelation.'), '413': problem(`More than ${DESCRIBE_MAX_VALUES} numbers.`) }
			})
		},
		'/api/v1/families': {
			get: operation('families', { summary: 'The shop’s engine families, layouts and limits in force', role: 'viewer', tag: 'Shop', example: '', responses: { '200': answer(FamiliesResponse, 'Families with their limits.') } })
		},
		'/api/v1/overview': {
			get: operation('overview', { summary: 'The shop’s figures at a glance', role: 'viewer', tag: 'Shop', example: '', responses: { '200': answer(OverviewResponse, 'Counts and as-received failure shares.') } })
		},
		'/api/v1/imports': {
			get: operation('listImports', { summary: 'Import batches, newest first', role: 'machinist', tag: 'Imports', query: importListSchema as unknown as ZodObjectLike, example: '', responses: { '200': answer(ImportList, 'The batches.') } }),
			post: operation('importCsv', {
				summary: 'Import a CSV file of readings (the request body)',
				role: 'machinist',
				tag: 'Imports',
				query: importQuerySchema as unknown as ZodObjectLike,
				requestBody: { required: true, content: { 'text/csv': { schema: { type: 'string' } } } },
				example: 'layout=wide&onReject=skip&fileName=bench-week-12.csv',
				exampleBody: { type: 'text/csv', data: '@readings.csv' },
				responses: {
					'201': answer(ImportAnswer, 'Stored: counts and the first rejected rows.'),
					'200': answer(ImportAnswer, 'A dry run, or a file already imported (duplicateOf).'),
					'409': answer(ImportAnswer, 'The same file was imported before (duplicateOf): nothing was stored.'),
					'413': problem('The file is larger than the upload limit.'),
					'415': problem('Not sent as text/csv.'),
					'422': json(
						{ anyOf: [ref(ImportAnswer), ref(HeaderRefusal), ref(ErrorBody)] },
						'Rows were refused and onReject was abort (asked for, or the shop’s setting): nothing was stored. Or the header cannot be placed, or the file is empty.'
					)
				}
			})
		},
		'/api/v1/imports/{id}': {
			get: operation('getImport', { summary: 'One import batch with its first rejected rows', role: 'machinist', tag: 'Imports', path: [idParam], responses: { '200': answer(ImportDetail, 'The batch.'), '404': problem('No such import.') } }),
			delete: operation('undoImport', { summary: 'Undo an import: its readings, and heads only it created, are removed', role: 'engineer', tag: 'Imports', path: [idParam], responses: { '200': answer(ImportUndone, 'Undone.'), '404': problem('No such import.'), '409': problem('Only a committed import can be undone.') } })
		},
		'/api/v1/imports/{id}/rejects.csv': {
			get: operation('importRejects', { summary: 'Every rejected row of an import as CSV', role: 'machinist', tag: 'Imports', path: [idParam], responses: { '200': csv('line, reason, row.'), '404': problem('No such import.') } })
		},
		'/api/v1/imports/headers': {
			post: operation('adviseHeaders', {
				summary: 'What the import makes of a header row, with suggestions for the rest',
				role: 'machinist',
				tag: 'Imports',
				requestBody: { required: true, content: { 'application/json': { schema: { type: 'object', required: ['headers'], properties: { headers: { type: 'array', items: { type: 'string' }, maxItems: 200 }, layout: { enum: ['wide', 'long'] } } } } } },
				exampleBody: { type: 'application/json', data: '{"headers": ["serial", "family", "cyl", "side", "clearance (in)"]}' },
				responses: { '200': answer(HeaderAdvice, 'Recognised columns, suggestions and any remembered mapping.') }
			})
		}
	},
	components: {
		securitySchemes: {
			bearer: { type: 'http', scheme: 'bearer', description: 'An API token, lmk_… (Shop → API tokens).' },
			session: { type: 'apiKey', in: 'cookie', name: 'authjs.session-token', description: 'The session of a signed-in browser.' }
		},
		schemas: componentSchemas()
	}
} as const;

/** A route id of src/routes (/api/v1/imports/[id]) as an OpenAPI path (/api/v1/imports/{id}). */
export function openApiPath(routeId: string): string {
	return routeId.replace(/\[(\w+)\]/g, '{$1}');
}
