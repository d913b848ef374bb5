import { error, json, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { handle as authHandle } from './auth';
import { POLICY, operationOf } from '$lib/server/auth/access';
import { actorFromBearer, actorFromSession } from '$lib/server/auth/actor';
import { requireRole, requireUser } from '$lib/server/auth/guards';
import { isDatabaseUnavailable, sql } from '$lib/server/db';
import { DATABASE_DOWN_MESSAGE, DATABASE_RETRY_SECONDS } from '$lib/database-down';
import { appJobs, startJobs } from '$lib/server/jobs';
import { building } from '$app/environment';

/** Once per server, before the first request: the background jobs (mail retries, the watch for
 * dead imports, the overview's warm-up), stopped again on shutdown. adapter-node closes the HTTP
 * server on SIGTERM/SIGINT, then emits sveltekit:shutdown: close the database pool too, so the
 * process can exit. */
export const init: ServerInit = () => {
	if (building) return;
	const jobs = startJobs(appJobs());
	process.once('sveltekit:shutdown', () => {
		jobs.stop();
		void sql.end({ timeout: 5 });
	});
};

/** Password sign-in goes only through the sign-in page's action, which validates and
 * rate-limits; a direct POST to Auth.js's credentials callback is refused. */
const closeCredentialsCallback: Handle = ({ event, resolve }) => {
	if (event.url.pathname.startsWith('/auth/callback/credentials')) {
		return new Response('Not found', { status: 404 });
	}
	return resolve(event);
};

/** Builds locals.actor from a Bearer token (API only) or the session. */
const actor: Handle = async ({ event, resolve }) => {
	event.locals.actor = null;
	const bearer = event.request.headers.get('authorization');
	if (bearer && event.url.pathname.startsWith('/api/v1/')) {
		const result = await actorFromBearer(bearer);
		if (result && 'error' in result) return json({ message: result.error }, { status: 401 });
		if (result) event.locals.actor = result.actor;
	} else {
		const session = await event.locals.auth();
		const userId = session?.user?.id;
		// The session id is checked against the database in the same round trip as the user.
		if (userId) event.locals.actor = await actorFromSession(event, userId, session?.sessionId);
	}
	return resolve(event);
};

/** Applies the access policy (src/lib/server/auth/access.ts) to every routed request. */
const guard: Handle = async ({ event, resolve }) => {
	const id = event.route.id;
	if (!id) return resolve(event); // no route: SvelteKit answers 404
	const policy = POLICY[id];
	if (!policy) {
		console.error(`[guard] route ${id} has no access policy; refusing`);
		error(403, 'This route has no access policy.');
	}
	const isAction = event.request.method === 'POST' && !policy.POST;
	const op = operationOf(event.request.method, event.url.search, isAction);
	const access = policy[op];
	if (!access) {
		if (event.request.method === 'OPTIONS') return resolve(event);
		error(405, `${event.request.method} is not allowed here.`);
	}
	if (access === 'public') return resolve(event);
	if (access === 'user') requireUser(event);
	else requireRole(event, access);
	return resolve(event);
};

/** Requests whose error was "the database is not answering" (marked by handleError). */
const databaseDown = new WeakSet<object>();

/** While PostgreSQL does not answer, a request gets 503 with a message that says so (a page
 * that retries by itself, or JSON) instead of a generic 500. handleError cannot set a status,
 * so this turns the 500 it marked into a 503; an error thrown by a later Handle becomes a 503
 * here directly. */
const databaseUnavailable: Handle = async ({ event, resolve }) => {
	let response: Response;
	try {
		response = await resolve(event);
	} catch (err) {
		if (!isDatabaseUnavailable(err)) throw err;
		console.error(`[db] ${event.request.method} ${event.url.pathname}: the database is not answering`);
		error(503, { message: DATABASE_DOWN_MESSAGE });
	}
	if (response.status !== 500 || !databaseDown.has(event.locals)) return response;
	const headers = new Headers(response.headers);
	headers.set('retry-after', String(DATABASE_RETRY_SECONDS));
	headers.set('cache-control', 'no-store');
	return new Response(response.body, { status: 503, statusText: 'Service Unavailable', headers });
};

export const handle = sequence(databaseUnavailable, closeCredentialsCallback, authHandle, actor, guard);

export const handleError: HandleServerError = ({ error: err, event, status, message }) => {
	const id = crypto.randomUUID();
	if (isDatabaseUnavailable(err)) {
		databaseDown.add(event.locals);
		console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}: the database is not answering`);
		return { message: DATABASE_DOWN_MESSAGE, id };
	}
	if (status !== 404) console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, err);
	return { message: status === 500 ? 'Something went wrong on our side.' : message, id };
};

