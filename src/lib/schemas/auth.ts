import { z } from 'zod';
import { sitePath } from './text';

/** E-mail addresses as people type them: trimmed, lower-cased, at most 254 characters (RFC 5321). */
export const emailSchema = z
	.string({ message: 'Enter your e-mail address.' })
	.trim()
	.min(1, 'Enter your e-mail address.')
	.max(254, 'That e-mail address is too long (254 characters at most).')
	.toLowerCase()
	.pipe(z.email({ message: 'That does not look like an e-mail address.' }));

export const passwordSchema = z
	.string({ message: 'Enter your password.' })
	.min(1, 'Enter your password.')
	.max(200, 'Passwords are at most 200 characters.');

export const newPasswordSchema = z
	.string()
	.min(10, 'Choose a password of at least 10 characters.')
	.max(200, 'Passwords are at most 200 characters.');

export const passwordSignIn = z.object({ email: emailSchema, password: passwordSchema });
export const linkSignIn = z.object({ email: emailSchema });

/** Where to go after signing in: only paths on this site (see sitePath), else `fallback`. */
export function safeRedirect(value: unknown, fallback = '/'): string {
	return sitePath(value) ?? fallback;
}

export function fieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = String(issue.path[0] ?? 'form');
		out[key] ??= issue.message;
	}
	return out;
}
