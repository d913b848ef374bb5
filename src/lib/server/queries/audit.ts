import { and, desc, eq, getTableColumns, gte, lt, sql, type SQL } from 'drizzle-orm';
import type { Conn } from '../db/scope';
import { auditLog, users } from '../db/schema';

export type AuditAction = 'create' | 'update' | 'delete' | 'undo' | 'override' | 'revoke' | 'import';

export interface AuditWho {
	userId: string | null;
	label: string;
}

/** Write one audit entry. Call it inside the transaction that makes the change. */
export async function audit(
	conn: Conn,
	shopId: string,
	who: AuditWho,
	entry: { entity: string; entityId: string; action: AuditAction; before?: unknown; after?: unknown }
) {
	await conn.insert(auditLog).values({
		shopId,
		actorUserId: who.userId,
		actorLabel: who.label,
		entity: entry.entity,
		entityId: entry.entityId,
		action: entry.action,
		before: entry.before ?? null,
		after: entry.after ?? null
	});
}

export interface AuditFilter {
	entity?: string;
	action?: string;
	actor?: string;
	from?: string;
	to?: string;
	page?: number;
	pageSize?: number;
}

export async function listAudit(conn: Conn, shopId: string, f: AuditFilter) {
	const where: SQL[] = [eq(auditLog.shopId, shopId)];
	if (f.entity) where.push(eq(auditLog.entity, f.entity));
	if (f.action) where.push(eq(auditLog.action, f.action));
	if (f.actor) {
		const like = '%' + f.actor.replace(/[%_\\]/g, '\\$&') + '%';
		where.push(sql`(${auditLog.actorLabel} ilike ${like} or ${users.name} ilike ${like})`);
	}
	if (f.from) where.push(gte(auditLog.at, new Date(f.from)));
	if (f.to) where.push(lt(auditLog.at, sql`${f.to}::date + 1`));
	const pageSize = f.pageSize ?? 50;
	const page = Math.max(1, f.page ?? 1);
	// The actor's name as it is now (a person's label was their e-mail when some entries were written).
	const rows = await conn
		.select({ ...getTableColumns(auditLog), actorName: users.name })
		.from(auditLog)
		.leftJoin(users, eq(users.id, auditLog.actorUserId))
		.where(and(...where))
		.orderBy(desc(auditLog.at), desc(auditLog.id))
		.limit(pageSize + 1)
		.offset((page - 1) * pageSize);
	return { rows: rows.slice(0, pageSize), hasMore: rows.length > pageSize, page };
}

export async function auditEntities(conn: Conn, shopId: string): Promise<string[]> {
	const rows = await conn.selectDistinct({ entity: auditLog.entity }).from(auditLog).where(eq(auditLog.shopId, shopId));
	return rows.map((r) => r.entity).sort();
}
