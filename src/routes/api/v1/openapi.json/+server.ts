import { json } from '@sveltejs/kit';
import { OPENAPI } from '$lib/server/openapi';
import type { RequestHandler } from './$types';

/** The API's OpenAPI 3.1 description: public, so tools can read it before they hold a token. */
export const GET: RequestHandler = () => json(OPENAPI, { headers: { 'cache-control': 'public, max-age=300' } });
