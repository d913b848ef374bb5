// The shop's audit log as the audit page reads it: one page of entries, newest first, each with
// its sentence, and the kinds of record that have entries (for the filter).
import { inShop } from '../db';
import { auditEntities, listAudit, type AuditFilter } from '../queries/audit';
import { auditSentence } from './audit-words';

export function auditLogPage(shopId: string, filter: AuditFilter) {
	return inShop(shopId, async (tx) => {
		const page = await listAudit(tx, shopId, filter);
		return {
			entities: await auditEntities(tx, shopId),
			...page,
			rows: page.rows.map((r) => ({ ...r, sentence: auditSentence(r) }))
		};
	});
}
