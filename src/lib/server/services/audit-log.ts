// The shop's audit log as the audit page reads it: one page of entries, newest first, and the
// kinds of record that have entries (for the filter).
import { inShop } from '../db';
import { auditEntities, listAudit, type AuditFilter } from '../queries/audit';

export function auditLogPage(shopId: string, filter: AuditFilter) {
	return inShop(shopId, async (tx) => ({
		entities: await auditEntities(tx, shopId),
		...(await listAudit(tx, shopId, filter))
	}));
}
