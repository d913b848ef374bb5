// What an import does with rejected rows when the request does not say: the shop's setting
// onReject, as the OpenAPI document (and so the API guide) says, and as the Imports page shows.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { apiTokens, families, shops } from '../../src/lib/server/db/schema';
import { eq } from 'drizzle-orm';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople, type TestPerson } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const HEADER = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm';
type Setup = { token: string; machinist: TestPerson };
const shop: Record<'skip' | 'abort' | 'none', Setup> = {} as never;

beforeAll(async () => {
	for (const setting of ['skip', 'abort', 'none'] as const) {
		const { shop: s, people } = await shopWithPeople(db, `onreject-${setting}`);
		await withShop(db, s.id, (tx) => tx.insert(families).values({ shopId: s.id, code: 'OAK-4', cylinders: 4, intakeValves: 1, exhaustValves: 1 }));
		const token = newApiToken();
		await withSystem(db, async (tx) => {
			if (setting !== 'none') await tx.update(shops).set({ settings: { onReject: setting } }).where(eq(shops.id, s.id));
			await tx.insert(apiTokens).values({ shopId: s.id, userId: people.machinist.userId, name: 'onReject test', prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role: 'machinist' });
		});
		shop[setting] = { token, machinist: people.machinist };
	}
});
afterAll(() => sql.end());

/** One good row and one with a cylinder the family does not have. */
const file = (serial: string) =>
	`${HEADER}\n${serial},OAK-4,as_received,1,intake,1,2026-02-01T08:00:00Z,Kim,0.05\n${serial},OAK-4,as_received,9,intake,1,2026-02-01T08:01:00Z,Kim,0.05\n`;

function upload(s: Setup, query: string, body: string) {
	return fetch(`${baseURL}/api/v1/imports?${query}`, { method: 'POST', headers: { authorization: `Bearer ${s.token}`, 'content-type': 'text/csv' }, body });
}

describe('onReject left out', () => {
	it('the OpenAPI document names the shop’s setting as the default', async () => {
		const doc = await (await fetch(`${baseURL}/api/v1/openapi.json`)).json();
		const param = doc.paths['/api/v1/imports'].post.parameters.find((p: { name: string }) => p.name === 'onReject');
		expect(param.required).toBe(false);
		expect(param.schema.default).toBeUndefined();
		expect(param.description).toBe(
			'abort (a rejected row stops the import: nothing is stored) or skip (store the good rows, report the rejected ones). Left out: the shop’s setting `onReject`, shown on the Imports page (`abort` for a shop that has none); the answer’s `onReject` and `onRejectFrom` say which applied.'
		);
	});

	it('a shop whose setting is skip stores the good rows', async () => {
		const res = await upload(shop.skip, 'fileName=default-skip.csv', file('DEF-SKIP'));
		expect(res.status).toBe(201);
		expect(await res.json()).toMatchObject({ accepted: 1, rejected: 1, readings: 1, onReject: 'skip', onRejectFrom: 'shop setting' });
	});

	it('a shop whose setting is abort, or that has none, stores nothing', async () => {
		for (const s of [shop.abort, shop.none]) {
			const res = await upload(s, 'fileName=default-abort.csv', file('DEF-ABORT'));
			expect(res.status).toBe(422);
			expect(await res.json()).toMatchObject({ readings: 0, rejected: 1, onReject: 'abort', onRejectFrom: 'shop setting' });
		}
	});

	it('the request’s own choice wins over the setting', async () => {
		const res = await upload(shop.skip, 'onReject=abort&fileName=asked-abort.csv', file('ASK-ABORT'));
		expect(res.status).toBe(422);
		expect(await res.json()).toMatchObject({ onReject: 'abort', onRejectFrom: 'request' });
	});

	it('the Imports page shows the shop’s setting', async () => {
		for (const [setting, words] of [['skip', 'skip that row, import the rest'], ['none', 'import nothing']] as const) {
			const c = new Client(baseURL);
			expect([302, 303]).toContain((await c.signIn(shop[setting].machinist.email, shop[setting].machinist.password)).status);
			const html = await (await c.get('/imports')).text();
			const note = html.match(/data-testid="on-reject-default"[^>]*>([\s\S]*?)<\/p>/)?.[1].replace(/<[^>]+>/g, '').replace(/\s+/g, ' ').trim();
			expect(note).toBe(`When a row is rejected, this shop’s setting is: ${words} (onReject=${setting === 'none' ? 'abort' : setting}). An upload starts from it; an API call that does not say uses it.`);
		}
	});
});
