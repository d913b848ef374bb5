// The demo's people: the sign-ins `npm start` prints (cheap, without generating any history),
// the user rows with their memberships and API tokens, and the machinists who measure.
import { createHash } from 'node:crypto';
import type { Role } from '../../measurements';
import { SHOP_TEMPLATES, type ShopTemplate } from './catalogue';
import type { Machinist } from './context';
import { dayOf, uuidOf, type Rng } from './random';
import type { ApiTokenRow, DemoOptions, DemoSignIn, MembershipRow, UserRow } from './types';

export function shopSlug(t: ShopTemplate, suffix: string): string {
	return suffix ? `${t.slug}-${suffix}` : t.slug;
}
function tokenOf(seed: number, email: string): string {
	return 'lmk_' + createHash('sha256').update(`${seed}|api-token|${email}`).digest('base64url').slice(0, 40);
}

export function normalise(opts: DemoOptions): Required<DemoOptions> {
	const o: Required<DemoOptions> = {
		seed: opts.seed ?? 20261201,
		endDate: opts.endDate,
		shops: opts.shops ?? 2,
		headsTotal: opts.headsTotal ?? 3000,
		months: opts.months ?? 24,
		slugSuffix: opts.slugSuffix ?? ''
	};
	if (!Number.isInteger(o.seed)) throw new RangeError('seed must be an integer');
	if (!Number.isInteger(o.shops) || o.shops < 1 || o.shops > SHOP_TEMPLATES.length)
		throw new RangeError(`shops must be 1..${SHOP_TEMPLATES.length}`);
	if (!Number.isInteger(o.headsTotal) || o.headsTotal < 0) throw new RangeError('headsTotal must be a whole number');
	if (!(o.months > 0 && o.months <= 240)) throw new RangeError('months must be in 1..240');
	if (o.slugSuffix && !/^[a-z0-9][a-z0-9-]{0,40}$/.test(o.slugSuffix))
		throw new RangeError('slugSuffix must be lowercase letters, digits and hyphens');
	dayOf(o.endDate);
	return o;
}

/** The demo sign-ins for these options, without generating any history. */
export function demoSignIns(opts: Omit<DemoOptions, 'endDate'> & { endDate?: string } = {}): DemoSignIn[] {
	const o = normalise({ ...opts, endDate: opts.endDate ?? '2000-01-01' });
	const out: DemoSignIn[] = [];
	for (const t of SHOP_TEMPLATES.slice(0, o.shops)) {
		const slug = shopSlug(t, o.slugSuffix);
		for (const role of ['owner', 'engineer', 'machinist', 'viewer'] as const) {
			const email = `${role}@${slug}.example`;
			out.push({
				email,
				password: `${slug}-${role}-demo`,
				role,
				shop: slug,
				shopName: t.name,
				name: t.users[role],
				token: tokenOf(o.seed, email)
			});
		}
	}
	return out;
}

/** The users of one shop's sign-ins, with their memberships and API tokens (only the hash kept). */
export function shopPeople(seed: number, shopId: string, signIns: readonly DemoSignIn[], verifiedAt: string) {
	const users: UserRow[] = [];
	const memberships: MembershipRow[] = [];
	const apiTokens: ApiTokenRow[] = [];
	const roleUsers = {} as Record<Role, string>;
	for (const s of signIns) {
		const userId = uuidOf(seed, `user|${s.email}`);
		roleUsers[s.role] = userId;
		users.push({ id: userId, name: s.name, email: s.email, emailVerified: verifiedAt });
		memberships.push({ shopId, userId, role: s.role });
		apiTokens.push({
			id: uuidOf(seed, `token|${s.email}`),
			shopId,
			userId,
			name: 'Demo token',
			prefix: s.token.slice(0, 12),
			tokenHash: createHash('sha256').update(s.token).digest('hex'),
			role: s.role
		});
	}
	return { users, memberships, apiTokens, roleUsers };
}

/** The people who measure: the machinist user first, then the template's others. */
export function machinistsOf(t: ShopTemplate, shopRng: Rng): Machinist[] {
	return [t.users.machinist, ...t.machinists].map((name, i) => ({
		name,
		// One person reams a touch large and less evenly: it shows on the control charts.
		boreBias: i === 2 ? 0.004 : shopRng.n(0, 0.0008),
		boreSd: i === 2 ? 0.0045 : 0.0028,
		raFactor: i === 3 ? 1.35 : 1
	}));
}
