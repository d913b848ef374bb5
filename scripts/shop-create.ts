// Creates a shop and its owner, for installs without public sign-up (or the first shop of any).
//
//   npm run shop:create -- --name "Harbour Head Works" --owner owner@example.com
//        [--owner-name "Robin Example"] [--units mm|inch] [--mileage km|miles] [--currency EUR]
//        [--origin https://lapmark.example.com] [--link-hours 72]
//
// Works against DATABASE_URL. A new owner gets a one-time link to choose a password (printed
// here and e-mailed through the outbox to SMTP_URL); an address that already has an account
// becomes the owner of the new shop and is told by mail. Bad input changes nothing (exit 2).
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { createDb } from '../src/lib/server/db/client';
import { withSystem } from '../src/lib/server/db/scope';
import { createTransport, deliver, queueMail } from '../src/lib/server/mail/outbox';
import { ownerAddedMail, ownerWelcomeMail } from '../src/lib/server/mail/shop-messages';
import { emailSchema } from '../src/lib/schemas/auth';
import { currencySchema, ownerNameSchema, shopNameSchema } from '../src/lib/schemas/shop';
import { createShopWithOwner, createUser, passwordLink, userIdByEmail } from '../src/lib/server/services/accounts';

const USAGE =
	'usage: npm run shop:create -- --name "Shop name" --owner owner@example.com [--owner-name "Name"] [--units mm|inch] [--mileage km|miles] [--currency EUR] [--origin URL] [--link-hours 72]';

function fail(message: string, code = 2): never {
	console.error(`[shop:create] ${message}`);
	if (code === 2) console.error(USAGE);
	process.exit(code);
}

const LENGTH_ALIASES: Record<string, 'mm' | 'in'> = { mm: 'mm', millimetre: 'mm', millimetres: 'mm', in: 'in', inch: 'in', inches: 'in' };
const DISTANCE_ALIASES: Record<string, 'km' | 'mi'> = { km: 'km', kilometres: 'km', mi: 'mi', mile: 'mi', miles: 'mi' };

/** The first problem of a zod result, naming the option. */
function check<T>(option: string, schema: z.ZodType<T>, value: unknown): T {
	const r = schema.safeParse(value);
	if (!r.success) fail(`${option}: ${r.error.issues[0].message}`);
	return r.data;
}

async function main() {
	let values;
	try {
		({ values } = parseArgs({
			options: {
				name: { type: 'string' },
				owner: { type: 'string' },
				'owner-name': { type: 'string' },
				units: { type: 'string', default: 'mm' },
				mileage: { type: 'string', default: 'km' },
				currency: { type: 'string', default: 'EUR' },
				origin: { type: 'string' },
				'link-hours': { type: 'string', default: '72' },
				help: { type: 'boolean', default: false }
			},
			strict: true
		}));
	} catch (e) {
		fail(e instanceof Error ? e.message : String(e));
	}
	if (values.help) {
		console.log(USAGE);
		return;
	}
	if (values.name === undefined) fail('--name is required: the shop\'s name');
	if (values.owner === undefined) fail("--owner is required: the owner's e-mail address");
	const shopName = check('--name', shopNameSchema, values.name);
	const owner = check('--owner', emailSchema, values.owner);
	const ownerName = values['owner-name'] === undefined ? null : check('--owner-name', ownerNameSchema, values['owner-name']);
	const lengthUnit = LENGTH_ALIASES[values.units.trim().toLowerCase()] ?? fail(`--units: "${values.units}" is not a length unit; use mm or inch.`);
	const distanceUnit = DISTANCE_ALIASES[values.mileage.trim().toLowerCase()] ?? fail(`--mileage: "${values.mileage}" is not a distance unit; use km or miles.`);
	const currency = check('--currency', currencySchema, values.currency.trim().toUpperCase());
	const hours = Number(values['link-hours']);
	if (!Number.isInteger(hours) || hours < 1 || hours > 24 * 14) fail('--link-hours: a whole number of hours from 1 to 336.');
	const origin = (values.origin ?? process.env.ORIGIN ?? `http://localhost:${process.env.PORT ?? 3000}`).replace(/\/+$/, '');
	if (!/^https?:\/\/[^/\s]+$/.test(origin)) fail(`--origin: "${origin}" is not an address like https://lapmark.example.com (the server's ORIGIN).`);

	const url = process.env.DATABASE_URL;
	if (!url) fail('DATABASE_URL is not set. For the private cluster of `npm start`: DATABASE_URL=$(bash scripts/pg.sh url lapmark_shop) npm run shop:create -- …', 1);

	const { db, sql } = createDb(url, { max: 2 });
	try {
		const made = await withSystem(db, async (tx) => {
			const existing = await userIdByEmail(tx, owner);
			const userId = existing ?? (await createUser(tx, { email: owner, name: ownerName, passwordHash: null, emailVerified: null, via: 'operator' }));
			const shop = await createShopWithOwner(tx, { name: shopName, lengthUnit, distanceUnit, currency }, { userId, label: 'npm run shop:create' }, 'operator');
			const link = existing ? null : await passwordLink(tx, userId, origin, hours);
			const mail = link ? ownerWelcomeMail(shop.name, link, hours) : ownerAddedMail(shop.name, `${origin}/signin`);
			const mailId = await queueMail(tx, { to: owner, shopId: shop.id, ...mail });
			return { shop, link, mailId, existing: Boolean(existing) };
		});
		const transport = createTransport(process.env.SMTP_URL ?? 'smtp://127.0.0.1:2525');
		const sent = await deliver(db, transport, process.env.MAIL_FROM ?? 'Lapmark <no-reply@lapmark.example>', made.mailId);
		transport.close();
		const s = made.shop;
		console.log(`[shop:create] created the shop "${s.name}" (${s.slug}, id ${s.id}; ${s.lengthUnit}, ${s.distanceUnit}, ${s.currency}) with ${owner} as its owner${made.existing ? ' (an existing account)' : ''}`);
		if (made.link) console.log(`[shop:create] link to choose the password (works once, for ${hours} hours): ${made.link}`);
		else console.log(`[shop:create] ${owner} already has a password: they sign in as before at ${origin}/signin`);
		if (sent.sent) console.log(`[shop:create] mailed to ${owner}`);
		else console.error(`[shop:create] the mail to ${owner} could not be sent now (${sent.error}); it stays in the outbox and a running server retries it`);
	} finally {
		await sql.end();
	}
}

main().catch((e) => fail(e instanceof Error ? (e.stack ?? e.message) : String(e), 1));
