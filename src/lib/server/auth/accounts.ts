// The one way an account comes to exist. Only two paths call it: accepting an invitation
// (services/invitations.ts) and the shop sign-up, both after the address was proven by a link.
// Auth.js cannot create accounts: its adapter's createUser refuses (src/auth.ts), so a sign-in
// link never makes a person without a shop.
import type { Conn } from '../db/scope';
import { users } from '../db/schema';

export interface NewAccount {
	/** Lower-case, trimmed; proven by the caller (the invitation or sign-up link). */
	email: string;
	name: string;
	/** From hashPassword() (auth/passwords.ts). */
	passwordHash: string;
}

/** Inserts the account; returns its id. Run it in the caller's transaction (system scope), with
 * the membership that gives the person their shop, so no account exists without one. */
export async function createAccount(conn: Conn, account: NewAccount): Promise<string> {
	const [u] = await conn
		.insert(users)
		.values({ email: account.email, name: account.name, passwordHash: account.passwordHash, emailVerified: new Date() })
		.returning({ id: users.id });
	return u.id;
}

export const NO_ACCOUNT_CREATION = 'Accounts are created only by accepting an invitation or by the shop sign-up.';
