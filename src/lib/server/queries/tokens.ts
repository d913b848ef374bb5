import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Role } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { apiTokens, users } from '../db/schema';

export async function listTokens(conn: Conn, shopId: string) {
	return conn
		.select({
			id: apiTokens.id,
			name: apiTokens.name,
			prefix: apiTokens.prefix,
			role: apiTokens.role,
			owner: users.email,
			userId: apiTokens.userId,
			createdAt: apiTokens.createdAt,
			expiresAt: apiTokens.expiresAt,
			lastUsedAt: apiTokens.lastUsedAt,
			revokedAt: apiTokens.revokedAt
		})
		.from(apiTokens)
		.innerJoin(users, eq(users.id, apiTokens.userId))
		.where(eq(apiTokens.shopId, shopId))
		.orderBy(desc(apiTokens.createdAt));
}

export async function insertToken(
	conn: Conn,
	v: { shopId: string; userId: string; name: string; prefix: string; tokenHash: string; role: Role; expiresAt: Date | null }
) {
	const [row] = await conn.insert(apiTokens).values(v).returning({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, role: apiTokens.role, expiresAt: apiTokens.expiresAt });
	return row;
}

export async function revokeToken(conn: Conn, shopId: string, id: string) {
	const rows = await conn
		.update(apiTokens)
		.set({ revokedAt: new Date() })
		.where(and(eq(apiTokens.shopId, shopId), eq(apiTokens.id, id), isNull(apiTokens.revokedAt)))
		.returning({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix });
	return rows[0] ?? null;
}
