// The only reader of the private environment. Validated once, when first imported.
import { building, dev } from '$app/environment';
import { env as raw } from '$env/dynamic/private';
import { z } from 'zod';

const schema = z.object({
	DATABASE_URL: z.string().url({ message: 'DATABASE_URL must be a postgres:// URL' }),
	AUTH_SECRET: z.string().min(32, 'AUTH_SECRET must be at least 32 characters'),
	/** SMTP server for outgoing mail; the project's local fake in development and tests. */
	SMTP_URL: z.string().default('smtp://127.0.0.1:2525'),
	MAIL_FROM: z.string().default('Lapmark <no-reply@lapmark.example>'),
	/** Folder where the local fake mail server keeps what it receives (with LAPMARK_DEMO=1 or in dev, enables /dev/mail). */
	LAPMARK_MAIL_DIR: z.string().optional(),
	/** Largest CSV upload accepted, in megabytes. */
	LAPMARK_UPLOAD_LIMIT_MB: z.coerce.number().positive().default(200),
	/** Set by `npm start` with demo data: the README's demo tokens are listed on the API page. */
	/** Failed sign-ins allowed per client address in 15 minutes (per e-mail address: 10). */
	LAPMARK_SIGNIN_CLIENT_LIMIT: z.coerce.number().int().positive().default(50),
	LAPMARK_DEMO: z.enum(['0', '1']).default('0'),
	/** How often each server looks for imports that died (no heartbeat for 30 s), in ms. */
	LAPMARK_IMPORT_WATCH_MS: z.coerce.number().int().min(100, 'LAPMARK_IMPORT_WATCH_MS must be at least 100 (ms)').default(10_000),
	/** Public shop sign-up at /signup: '1' (default) open, '0' closed (the operator runs `npm run shop:create`). */
	LAPMARK_PUBLIC_SIGNUP: z.enum(['0', '1'], { message: 'LAPMARK_PUBLIC_SIGNUP must be 0 or 1' }).default('1'),
	ORIGIN: z.string().url({ message: 'ORIGIN must be the public URL, e.g. https://lapmark.example.com' }).optional()
});

// While building, SvelteKit loads server modules to analyse them; nothing connects then.
const parsed = schema.safeParse(
	building ? { ...raw, DATABASE_URL: raw.DATABASE_URL || 'postgres://build@127.0.0.1:1/build', AUTH_SECRET: raw.AUTH_SECRET || 'x'.repeat(32) } : raw
);
if (!parsed.success) {
	const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
	throw new Error(`Lapmark's environment is not valid: ${problems}`);
}

export const env = parsed.data;
export const uploadLimitBytes = Math.round(env.LAPMARK_UPLOAD_LIMIT_MB * 1024 * 1024);
export const demoMode = env.LAPMARK_DEMO === '1';
export const publicSignup = env.LAPMARK_PUBLIC_SIGNUP === '1';
export const mailFakeDir = env.LAPMARK_MAIL_DIR ?? null;

/**
 * The public origin (scheme, host, port) of this app: ORIGIN, or in development Vite's
 * localhost address. Every absolute URL Lapmark builds (sign-in links, password reset and
 * invitation links, Auth.js redirects) starts with it; the request's Host, X-Forwarded-Host and
 * X-Forwarded-Proto headers are never used for that (see pinPublicOrigin in src/auth.ts).
 */
export const publicOrigin = new URL(env.ORIGIN || `http://localhost:${raw.PORT || (dev ? 5173 : 3000)}`).origin;
