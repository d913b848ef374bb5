import { z } from 'zod';
import { hasControl, text } from './text';

const flag = z.enum(['0', '1', 'true', 'false']).transform((v) => v === '1' || v === 'true');

export const importQuerySchema = z.object({
	layout: z.enum(['wide', 'long'], { message: 'layout must be wide or long' }).optional(),
	dryRun: flag.default(false),
	onReject: z.enum(['abort', 'skip'], { message: 'onReject must be abort or skip' }).optional(),
	fileName: text('fileName').trim().min(1).max(255, 'fileName is at most 255 characters').optional(),
	clientRef: z.string().regex(/^[\w-]{8,64}$/, 'clientRef: 8–64 letters, digits, - or _').optional(),
	mapping: text('mapping')
		.max(20_000, 'mapping is at most 20000 characters')
		.transform((s, ctx) => {
			try {
				const v = JSON.parse(s);
				if (v && typeof v === 'object' && !Array.isArray(v) && Object.entries(v).every(([k, x]) => typeof x === 'string' && !hasControl(k) && !hasControl(x))) return v as Record<string, string>;
			} catch {
				/* fall through */
			}
			ctx.addIssue({ code: 'custom', message: 'mapping must be a JSON object of header → name (without control characters)' });
			return z.NEVER;
		})
		.optional()
});

export const importListSchema = z.object({ clientRef: z.string().regex(/^[\w-]{8,64}$/).optional() });

export const mappingRequestSchema = z.object({
	headers: z.array(text('headers').max(200, 'a header is at most 200 characters')).min(1).max(200),
	layout: z.enum(['wide', 'long']).optional()
});
