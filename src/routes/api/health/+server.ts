import { json } from '@sveltejs/kit';
import { DATABASE_DOWN_MESSAGE, DATABASE_RETRY_SECONDS } from '$lib/database-down';
import { databaseAnswers } from '$lib/server/services/health';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	if (await databaseAnswers()) return json({ ok: true, db: 'up' }, { headers: { 'cache-control': 'no-store' } });
	return json(
		{ ok: false, db: 'down', message: DATABASE_DOWN_MESSAGE },
		{ status: 503, headers: { 'cache-control': 'no-store', 'retry-after': String(DATABASE_RETRY_SECONDS) } }
	);
};
