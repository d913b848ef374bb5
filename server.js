// Lapmark's web server (`node server.js`): the SvelteKit app that adapter-node builds
// (build/handler.js, a custom server as adapter-node documents it) behind a thin Node HTTP layer
// for what has to happen before the app reads a request, or for answers it never sees:
//
// - security headers on every response, static files and refusals included;
// - request bodies: each route has a size limit (1 MB, describe 4 MB, the CSV import its
//   LAPMARK_UPLOAD_LIMIT_MB), refused on Content-Length before `100 Continue` is sent, counted
//   while reading when there is none; a body the app stops reading is drained (up to a cap)
//   instead of resetting the connection, so the client reads its 413 rather than a reset;
// - query strings of at most 64 KiB and headers of at most 256 KiB, answered with words;
// - the other loopback name (127.0.0.1 when ORIGIN says localhost, or the reverse) is sent to
//   ORIGIN before any page is shown, and a cross-site form gets a 403 that says why (SvelteKit's
//   own check stays on behind this one).
import http from 'node:http';
import process from 'node:process';
import { Readable } from 'node:stream';

const KiB = 1024;
const MiB = 1024 * KiB;
const env = process.env;

const uploadMb = Number(env.LAPMARK_UPLOAD_LIMIT_MB || 200);
const uploadLimit = Math.round((Number.isFinite(uploadMb) && uploadMb > 0 ? uploadMb : 200) * MiB);
/** Forms and JSON bodies everywhere else. */
const SMALL_LIMIT = 1 * MiB;
/** POST /api/v1/stats/describe takes up to 100,000 numbers written out in full. */
const DESCRIBE_LIMIT = 4 * MiB;
/** Longest query string; the import's `mapping` (20,000 characters of JSON) fits escaped. */
const MAX_QUERY = 64 * KiB;
/** Request line plus headers (Node's default is 16 KiB, which a long query string exceeds). */
const MAX_HEADERS = 256 * KiB;
/** A refused or abandoned body is read and dropped for this long / this much, then the
 * connection is closed: long enough for the client to read the answer first. */
const DRAIN_MS = 10_000;
const DRAIN_BYTES = 64 * MiB;

// The app enforces the import's limit itself while it streams; adapter-node's own limit would
// otherwise cut every body at 512 KB.
env.BODY_SIZE_LIMIT ??= 'Infinity';

const origin = env.ORIGIN ? new URL(env.ORIGIN) : null;
const LOOPBACK = new Set(['localhost', '127.0.0.1', '[::1]']);

const SECURITY_HEADERS = {
	'x-content-type-options': 'nosniff',
	'referrer-policy': 'strict-origin-when-cross-origin',
	'x-frame-options': 'DENY',
	// Pages get SvelteKit's full policy (svelte.config.js), which replaces this one.
	'content-security-policy': "frame-ancestors 'none'",
	...(origin?.protocol === 'https:' ? { 'strict-transport-security': 'max-age=31536000; includeSubDomains' } : {})
};

const { handler } = await import(new URL('./build/handler.js', import.meta.url).href);

/** The body limit of a route, and whether the app streams it (the CSV import) or it is small. */
function bodyLimit(method, pathname) {
	if (method === 'POST' && pathname === '/api/v1/imports') {
		return { bytes: uploadLimit, stream: true, message: `The file is larger than the limit of ${Math.round(uploadLimit / MiB)} MB.` };
	}
	if (method === 'POST' && pathname === '/api/v1/stats/describe') {
		return { bytes: DESCRIBE_LIMIT, stream: false, message: `The body is larger than ${DESCRIBE_LIMIT / MiB} MB: send at most 100000 numbers in one request.` };
	}
	return { bytes: SMALL_LIMIT, stream: false, message: `The request body is larger than ${SMALL_LIMIT / MiB} MB, the most this address takes.` };
}

function escapeHtml(s) {
	return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** A refusal in the form the client reads: an enhanced form's action result, JSON, or a page. */
function answer(req, res, status, message, { close = false, extra = '' } = {}) {
	const accept = String(req.headers.accept ?? '');
	let type;
	let body;
	if (req.headers['x-sveltekit-action'] === 'true') {
		type = 'application/json';
		body = JSON.stringify({ type: 'error', error: { message } });
	} else if ((req.url ?? '').startsWith('/api/') || (accept.includes('application/json') && !accept.includes('text/html'))) {
		type = 'application/json';
		body = JSON.stringify({ message });
	} else {
		type = 'text/html; charset=utf-8';
		body =
			`<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${status} · Lapmark</title>` +
			`<meta name="viewport" content="width=device-width, initial-scale=1"></head>` +
			`<body style="font-family: system-ui, sans-serif; max-width: 40rem; margin: 4rem auto; padding: 0 1rem">` +
			`<h1>${status === 403 ? 'This form was refused' : 'This request was refused'}</h1><p>${escapeHtml(message)}</p>${extra}</body></html>`;
	}
	const headers = { 'content-type': type, 'content-length': Buffer.byteLength(body), 'cache-control': 'no-store' };
	if (close) headers.connection = 'close';
	res.writeHead(status, headers);
	res.end(req.method === 'HEAD' ? undefined : body);
}

/** Reads and drops what is left of a body the app does not want, then lets the connection go:
 * closing at once would reset it, and a client still sending would lose the answer. */
function drain(req, res) {
	if (req.complete || req.destroyed || req.__lapmarkDraining) return;
	req.__lapmarkDraining = true;
	const socket = req.socket;
	let dropped = 0;
	const close = () => {
		clearTimeout(timer);
		if (res.writableFinished || res.destroyed) socket.destroy();
		else res.once('close', () => socket.destroy());
	};
	const timer = setTimeout(close, DRAIN_MS);
	timer.unref();
	req.removeAllListeners('data');
	req.on('data', (chunk) => {
		dropped += chunk.length;
		if (dropped > DRAIN_BYTES) {
			req.pause();
			close();
		}
	});
	req.once('end', () => clearTimeout(timer));
	req.once('close', () => clearTimeout(timer));
	req.resume();
}

/**
 * The request as the app reads it: the same headers, address and socket, with the body passed
 * on from `req` (or replayed from `buffered`). When the app stops reading (cancels the body, as
 * the import does past its limit), the rest is drained rather than the connection reset.
 */
class BodyReader extends Readable {
	constructor(req, res, { buffered = null, limit = Infinity } = {}) {
		super();
		this.headers = req.headers;
		this.rawHeaders = req.rawHeaders;
		this.url = req.url;
		this.method = req.method;
		this.httpVersion = req.httpVersion;
		this.httpVersionMajor = req.httpVersionMajor;
		this.httpVersionMinor = req.httpVersionMinor;
		this.socket = req.socket;
		this.connection = req.socket;
		this.source = req;
		this.res = res;
		this.on('error', () => {}); // the app is told through its own listeners
		if (buffered) {
			for (const chunk of buffered) this.push(chunk);
			this.push(null);
			this.detach = () => {};
			return;
		}
		let seen = 0;
		const onData = (chunk) => {
			seen += chunk.length;
			if (seen > limit) {
				this.destroy(Object.assign(new Error('The request body is larger than this address takes.'), { status: 413 }));
				return;
			}
			if (!this.push(chunk)) req.pause();
		};
		const onEnd = () => this.push(null);
		const onClose = () => {
			if (!req.complete) this.destroy(new Error('The connection closed before the body was complete.'));
		};
		// Answered before the body was read to its end (a 405, a 403 of the guard…): drop the rest.
		const onFinish = () => {
			if (!req.complete && !this.destroyed) this.destroy();
		};
		req.on('data', onData);
		req.once('end', onEnd);
		req.once('close', onClose);
		res.once('finish', onFinish);
		this.detach = () => {
			req.off('data', onData);
			req.off('end', onEnd);
			req.off('close', onClose);
			res.off('finish', onFinish);
		};
	}

	_read() {
		this.source.resume();
	}

	_destroy(err, callback) {
		this.detach();
		drain(this.source, this.res);
		callback(err);
	}
}

/** Reads a small body whole, up to `limit` bytes; null when it is larger. */
function readSmall(req, limit) {
	return new Promise((resolve, reject) => {
		const chunks = [];
		let size = 0;
		const onData = (chunk) => {
			size += chunk.length;
			if (size > limit) {
				cleanup();
				resolve(null);
				return;
			}
			chunks.push(chunk);
		};
		const onEnd = () => {
			cleanup();
			resolve(chunks);
		};
		const onError = (e) => {
			cleanup();
			reject(e);
		};
		const cleanup = () => {
			req.off('data', onData);
			req.off('end', onEnd);
			req.off('error', onError);
		};
		req.on('data', onData);
		req.on('end', onEnd);
		req.on('error', onError);
	});
}

function splitUrl(url) {
	const q = url.indexOf('?');
	return q < 0 ? { pathname: url, query: '' } : { pathname: url.slice(0, q), query: url.slice(q + 1) };
}

/** Why a request is refused before the app reads it (status, message, options), or null. */
function refusal(req) {
	const { pathname, query } = splitUrl(req.url ?? '/');
	if (query.length > MAX_QUERY) {
		let longest = { name: '', size: 0 };
		for (const part of query.split('&')) {
			const eq = part.indexOf('=');
			const raw = eq < 0 ? part : part.slice(0, eq);
			let name = raw;
			try {
				name = decodeURIComponent(raw.replace(/\+/g, ' '));
			} catch {
				/* keep it as sent */
			}
			if (part.length > longest.size) longest = { name: name.slice(0, 60), size: part.length };
		}
		return {
			status: 414,
			message: `The query string is ${query.length} characters; at most ${MAX_QUERY} are read. The longest parameter is ${longest.name || '(no name)'} (${longest.size} characters): send less in it.`
		};
	}
	const method = req.method ?? 'GET';
	if (origin && ['POST', 'PUT', 'PATCH', 'DELETE'].includes(method) && isFormType(req.headers['content-type'])) {
		const from = req.headers.origin;
		if (from !== origin.origin) {
			const where = from && from !== 'null' ? `from ${from}` : 'from a page that did not say where it came from';
			return {
				status: 403,
				message: `This form was sent ${where}, but Lapmark is served at ${origin.origin}. Open ${origin.origin}${pathname} and send it again.`,
				extra: `<p><a href="${escapeHtml(origin.origin + pathname)}">Open ${escapeHtml(origin.origin + pathname)}</a></p>`
			};
		}
	}
	const limit = bodyLimit(method, pathname);
	const declared = req.headers['content-length'] === undefined ? null : Number(req.headers['content-length']);
	if (declared !== null && declared > limit.bytes) return { status: 413, message: limit.message };
	return null;
}

function isFormType(contentType) {
	const type = String(contentType ?? '').split(';')[0].trim().toLowerCase();
	return ['application/x-www-form-urlencoded', 'multipart/form-data', 'text/plain', 'application/x-sveltekit-formdata'].includes(type);
}

/** The ORIGIN address of a request that came in under the other loopback name, or null. */
function loopbackRedirect(req) {
	if (!origin || !LOOPBACK.has(origin.hostname)) return null;
	if (req.method !== 'GET' && req.method !== 'HEAD') return null;
	const host = String(req.headers.host ?? '');
	if (!host || host === origin.host) return null;
	const name = host.startsWith('[') ? host.slice(0, host.indexOf(']') + 1) : host.split(':')[0];
	if (!LOOPBACK.has(name.toLowerCase())) return null;
	return origin.origin + (req.url ?? '/');
}

function hasBody(req) {
	const length = req.headers['content-length'];
	return (length !== undefined && Number(length) > 0) || req.headers['transfer-encoding'] !== undefined;
}

function app(req, res) {
	const notFound = () => {
		if (!res.headersSent) answer(req, res, 404, 'Not found.');
	};
	Promise.resolve(handler(req, res, notFound)).catch((e) => {
		console.error('[server] the app failed to answer', e);
		if (!res.headersSent) answer(req, res, 500, 'Something went wrong on our side.');
		else res.destroy();
	});
}

async function onRequest(req, res, expectsContinue = false) {
	for (const [name, value] of Object.entries(SECURITY_HEADERS)) res.setHeader(name, value);

	const to = loopbackRedirect(req);
	if (to) {
		res.writeHead(307, { location: to, 'content-type': 'text/plain; charset=utf-8', ...(expectsContinue ? { connection: 'close' } : {}) });
		res.end(`Lapmark is served at ${to}`);
		if (!expectsContinue) drain(req, res);
		return;
	}
	const refused = refusal(req);
	if (refused) {
		// A client waiting for `100 Continue` sends no body: the connection cannot be reused.
		answer(req, res, refused.status, refused.message, { close: expectsContinue, extra: refused.extra });
		if (!expectsContinue) drain(req, res);
		return;
	}
	if (expectsContinue) res.writeContinue();
	if (!hasBody(req)) return app(req, res);

	const limit = bodyLimit(req.method, splitUrl(req.url ?? '/').pathname);
	if (limit.stream) return app(new BodyReader(req, res, { limit: limit.bytes + MiB }), res);
	// A small body without Content-Length (chunked) is read here, up to its limit, before the
	// app sees any of it; one with Content-Length is framed by it and was checked above.
	if (req.headers['content-length'] !== undefined) return app(new BodyReader(req, res), res);
	let chunks;
	try {
		chunks = await readSmall(req, limit.bytes);
	} catch {
		return; // the client went away
	}
	if (!chunks) {
		answer(req, res, 413, limit.message);
		drain(req, res);
		return;
	}
	app(new BodyReader(req, res, { buffered: chunks }), res);
}

const server = http.createServer({ maxHeaderSize: MAX_HEADERS });
server.on('request', (req, res) => void onRequest(req, res));
server.on('checkContinue', (req, res) => void onRequest(req, res, true));
server.on('clientError', (err, socket) => {
	if (!socket.writable || err.code === 'ECONNRESET') {
		socket.destroy();
		return;
	}
	const tooLarge = err.code === 'HPE_HEADER_OVERFLOW';
	const message = tooLarge
		? `The request's address and headers are larger than ${MAX_HEADERS / KiB} KiB: send a shorter query string (at most ${MAX_QUERY / KiB} KiB).`
		: 'The request is not valid HTTP/1.1.';
	const status = tooLarge ? '431 Request Header Fields Too Large' : '400 Bad Request';
	const extra = Object.entries(SECURITY_HEADERS)
		.map(([k, v]) => `${k}: ${v}\r\n`)
		.join('');
	socket.end(
		`HTTP/1.1 ${status}\r\ncontent-type: text/plain; charset=utf-8\r\ncontent-length: ${Buffer.byteLength(message)}\r\n${extra}connection: close\r\n\r\n${message}`
	);
});

const keepAlive = Number(env.KEEP_ALIVE_TIMEOUT);
if (Number.isFinite(keepAlive) && keepAlive > 0) server.keepAliveTimeout = keepAlive * 1000;

const host = env.HOST || '0.0.0.0';
const port = Number(env.PORT || 3000);
server.listen({ host, port }, () => console.log(`Listening on http://${host}:${server.address().port}`));

// As adapter-node's own entry does: stop taking requests, let those under way finish (at most
// SHUTDOWN_TIMEOUT seconds, default 8), then tell the app (hooks.server.ts closes the pool).
let stopping = null;
for (const event of ['request', 'checkContinue']) {
	server.on(event, (req) => req.once('close', () => stopping && server.closeIdleConnections()));
}
function shutdown(reason) {
	if (stopping) return;
	stopping = setTimeout(() => server.closeAllConnections(), Number(env.SHUTDOWN_TIMEOUT || 8) * 1000);
	stopping.unref();
	server.closeIdleConnections();
	server.close(() => {
		clearTimeout(stopping);
		process.emit('sveltekit:shutdown', reason);
	});
}
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
