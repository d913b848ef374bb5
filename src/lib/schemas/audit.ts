import { z } from 'zod';
import { calendarDay, text } from './text';

const day = (name: string) => calendarDay(name);
export const auditFilterSchema = z.object({
	entity: text('entity').max(40, 'entity is at most 40 characters').optional(),
	action: z.enum(['create', 'update', 'delete', 'undo', 'override', 'revoke', 'import']).optional(),
	actor: text('actor').max(120, 'actor is at most 120 characters').optional(),
	from: day('from').optional(),
	to: day('to').optional(),
	page: z.coerce.number().int().min(1).max(100_000).default(1)
});
export type AuditFilterInput = z.infer<typeof auditFilterSchema>;

/** Drop empty query parameters so `?entity=` means "any". */
export function nonEmpty(params: URLSearchParams): Record<string, string> {
	return Object.fromEntries([...params].filter(([, v]) => v.trim() !== ''));
}
