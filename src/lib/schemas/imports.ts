import { z } from 'zod';

const flag = z.enum(['0', '1', 'true', 'false']).transform((v) => v === '1' || v === 'true');

export const importQuerySchema = z.object({
	layout: z.enum(['wide', 'long'], { message: 'layout must be wide or long' }).optional(),
	dryRun: flag.default(false),
	onReject: z.enum(['abort', 'skip'], { message: 'onReject must be abort or skip' }).optional(),
	fileName: z.string().trim().min(1).max(255).optional(),
	clientRef: z.string().regex(/^[\w-]{8,64}$/, 'clientRef: 8–64 letters, digits, - or _').optional(),
	mapping: z
		.string()
		.max(20_000)
		.transform((s, ctx) => {
			try {
				const v = JSON.parse(s);
				if (v && typeof v === 'object' && !Array.isArray(v) && Object.values(v).every((x) => typeof x === 'string')) return v as Record<string, string>;
			} catch {
				/* fall through */
			}
			ctx.addIssue({ code: 'custom', message: 'mapping must be a JSON object of header → name' });
			return z.NEVER;
		})
		.optional()
});

export const importListSchema = z.object({ clientRef: z.string().regex(/^[\w-]{8,64}$/).optional() });

export const mappingRequestSchema = z.object({
	headers: z.array(z.string().max(200)).min(1).max(200),
	layout: z.enum(['wide', 'long']).optional()
});
