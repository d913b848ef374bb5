// Auth.js: e-mail + password (Credentials) and sign-in links by e-mail (Nodemailer provider),
// users and link tokens stored through the Drizzle adapter. Sessions are signed JWT cookies,
// which Credentials requires and which survive a server restart (AUTH_SECRET is kept in the
// data folder by `npm start`).
import { DrizzleAdapter } from '@auth/drizzle-adapter';
import { SvelteKitAuth } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import Nodemailer from '@auth/sveltekit/providers/nodemailer';
import { eq } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { accounts, sessions, users, verificationTokens } from '$lib/server/db/schema';
import { env } from '$lib/server/env';
import { verifyPassword } from '$lib/server/auth/passwords';
import { sendSignInLink } from '$lib/server/mail/messages';

export const { handle, signIn, signOut } = SvelteKitAuth({
	adapter: DrizzleAdapter(db, {
		usersTable: users,
		accountsTable: accounts,
		sessionsTable: sessions,
		verificationTokensTable: verificationTokens
	}),
	secret: env.AUTH_SECRET,
	trustHost: true,
	basePath: '/auth',
	session: { strategy: 'jwt', maxAge: 30 * 24 * 60 * 60 },
	pages: { signIn: '/signin', error: '/signin', verifyRequest: '/signin/check-email' },
	providers: [
		Credentials({
			credentials: { email: {}, password: {} },
			// Reached only through the sign-in page's action, which validates and rate-limits first.
			async authorize(credentials) {
				const email = String(credentials?.email ?? '').trim().toLowerCase();
				const password = String(credentials?.password ?? '');
				const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
				const ok = await verifyPassword(password, user?.passwordHash);
				if (!user || !ok) return null;
				return { id: user.id, email: user.email, name: user.name };
			}
		}),
		Nodemailer({
			server: env.SMTP_URL,
			from: env.MAIL_FROM,
			maxAge: 60 * 60,
			sendVerificationRequest: ({ identifier, url }) => sendSignInLink(identifier, url)
		})
	],
	callbacks: {
		jwt({ token, user }) {
			if (user?.id) token.sub = user.id;
			return token;
		},
		session({ session, token }) {
			if (token.sub) session.user.id = token.sub;
			return session;
		}
	}
});
