import { z } from 'zod';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-01-31.');
export const auditFilterSchema = z.object({
	entity: z.string().max(40).optional(),
	action: z.enum(['create', 'update', 'delete', 'undo', 'override', 'revoke', 'import']).optional(),
	actor: z.string().max(120).optional(),
	from: day.optional(),
	to: day.optional(),
	page: z.coerce.number().int().min(1).max(100_000).default(1)
});
export type AuditFilterInput = z.infer<typeof auditFilterSchema>;

/** Drop empty query parameters so `?entity=` means "any". */
export function nonEmpty(params: URLSearchParams): Record<string, string> {
	return Object.fromEntries([...params].filter(([, v]) => v.trim() !== ''));
}
