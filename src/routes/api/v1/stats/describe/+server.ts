import { error, json } from '@sveltejs/kit';
import { DESCRIBE_MAX_VALUES, describeBodySchema, issuesMessage } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { readJsonBody } from '$lib/server/http';
import { describeValues } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** Room for DESCRIBE_MAX_VALUES numbers written out in full (about 25 characters each). */
const MAX_BYTES = 4 * 1024 * 1024;
const TOO_MANY = `Send at most ${DESCRIBE_MAX_VALUES} numbers in one request.`;

/** The summary of the distribution routes, plus the lag-1 autocorrelation, of numbers sent as a
 * JSON array (in time order, for the autocorrelation). */
export const POST: RequestHandler = async (event) => {
	requireRole(event, 'viewer');
	const body = await readJsonBody(event.request, MAX_BYTES, `${TOO_MANY} This body is larger than ${MAX_BYTES / 1024 / 1024} MB.`);
	if (Array.isArray(body) && body.length > DESCRIBE_MAX_VALUES) error(413, `${TOO_MANY} This one has ${body.length}.`);
	const values = describeBodySchema.safeParse(body);
	if (!values.success) error(400, issuesMessage(values.error.issues));
	try {
		return json(describeValues(values.data));
	} catch (e) {
		// assertFiniteSums (stats/input.ts): each number is finite, but their sums are not.
		if (e instanceof RangeError) error(400, `body: ${e.message}`);
		throw e;
	}
};
