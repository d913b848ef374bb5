import { json } from '@sveltejs/kit';
import { sql } from '$lib/server/db';
import { DATABASE_DOWN_MESSAGE, DATABASE_RETRY_SECONDS } from '$lib/database-down';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	try {
		await Promise.race([
			sql`select 1`,
			new Promise((_, reject) => setTimeout(() => reject(new Error('timeout')), 2000))
		]);
		return json({ ok: true, db: 'up' }, { headers: { 'cache-control': 'no-store' } });
	} catch {
		return json(
			{ ok: false, db: 'down', message: DATABASE_DOWN_MESSAGE },
			{ status: 503, headers: { 'cache-control': 'no-store', 'retry-after': String(DATABASE_RETRY_SECONDS) } }
		);
	}
};
