import { and, asc, desc, eq, gt, isNull, sql } from 'drizzle-orm';
import type { Role } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { invitations, memberships, users } from '../db/schema';

export async function listMembers(conn: Conn, shopId: string) {
	return conn
		.select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
		.from(memberships)
		.innerJoin(users, eq(users.id, memberships.userId))
		.where(eq(memberships.shopId, shopId))
		.orderBy(asc(users.email));
}

/** The role of the member with this e-mail (any case), or null when none is. */
export async function memberRoleByEmail(conn: Conn, shopId: string, email: string): Promise<Role | null> {
	const [row] = await conn
		.select({ role: memberships.role })
		.from(memberships)
		.innerJoin(users, eq(users.id, memberships.userId))
		.where(and(eq(memberships.shopId, shopId), sql`lower(${users.email}) = lower(${email})`))
		.limit(1);
	return row?.role ?? null;
}

export async function memberRole(conn: Conn, shopId: string, userId: string): Promise<Role | null> {
	const [row] = await conn
		.select({ role: memberships.role })
		.from(memberships)
		.where(and(eq(memberships.shopId, shopId), eq(memberships.userId, userId)))
		.limit(1);
	return row?.role ?? null;
}

/** Owners other than `userId`, locked: the last owner can neither leave nor be demoted. */
export async function otherOwners(conn: Conn, shopId: string, userId: string): Promise<number> {
	const rows = await conn.execute<{ user_id: string }>(sql`
		select user_id from memberships
		where shop_id = ${shopId} and role = 'owner' and user_id <> ${userId}
		for update`);
	return rows.length;
}

export async function setRole(conn: Conn, shopId: string, userId: string, role: Role) {
	await conn.update(memberships).set({ role }).where(and(eq(memberships.shopId, shopId), eq(memberships.userId, userId)));
}

export async function removeMember(conn: Conn, shopId: string, userId: string) {
	await conn.delete(memberships).where(and(eq(memberships.shopId, shopId), eq(memberships.userId, userId)));
}

export async function pendingInvitations(conn: Conn, shopId: string) {
	return conn
		.select({ id: invitations.id, email: invitations.email, role: invitations.role, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
		.from(invitations)
		.where(and(eq(invitations.shopId, shopId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, sql`now()`)))
		.orderBy(desc(invitations.createdAt));
}

export async function createInvitation(conn: Conn, v: { shopId: string; email: string; role: Role; tokenHash: string; invitedBy: string }) {
	const [row] = await conn
		.insert(invitations)
		.values({ ...v, expiresAt: sql`now() + interval '7 days'` })
		.returning();
	return row;
}

export async function revokeInvitation(conn: Conn, shopId: string, id: string) {
	const rows = await conn
		.update(invitations)
		.set({ revokedAt: sql`now()` })
		.where(and(eq(invitations.shopId, shopId), eq(invitations.id, id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
		.returning({ id: invitations.id, email: invitations.email });
	return rows[0] ?? null;
}

/** An invitation by its secret's hash, whatever its state (the caller explains why it fails). */
export async function invitationByHash(conn: Conn, tokenHash: string) {
	const [row] = await conn.select().from(invitations).where(eq(invitations.tokenHash, tokenHash)).limit(1);
	return row ?? null;
}

/** The addresses of the shop's own people (lower-cased): its members, its customers and the
 * people it has invited and who have not answered yet. */
export async function shopPeopleAddresses(conn: Conn, shopId: string): Promise<string[]> {
	const rows = await conn.execute<{ address: string }>(sql`
		select lower(u.email) as address from memberships m join "user" u on u.id = m.user_id where m.shop_id = ${shopId}
		union select lower(customer_email) from heads where shop_id = ${shopId} and customer_email is not null
		union select lower(email) from invitations
			where shop_id = ${shopId} and accepted_at is null and revoked_at is null and expires_at > now()`);
	return rows.map((r) => r.address);
}
