import { SvelteKitAuth, type SvelteKitAuthConfig } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import * as users from './repositories/users';
import { env } from './env';
import { getRuntime } from './runtime';
import { readTicket } from './tokens';

/**
 * Auth.js issues and reads the session cookie (a JWT). Passwords are checked, and sign-ins rate-limited, by our
 * own sign-in action, which hands Auth.js a one-minute ticket; Auth.js's HTTP endpoints are closed in hooks.
 */
export const {
	handle: authHandle,
	signIn,
	signOut
} = SvelteKitAuth(async (): Promise<SvelteKitAuthConfig> => ({
	secret: env().AUTH_SECRET,
	trustHost: true,
	basePath: '/auth',
	session: { strategy: 'jwt', maxAge: 12 * 3600 },
	pages: { signIn: '/signin', error: '/signin' },
	providers: [
		Credentials({
			credentials: { ticket: {} },
			async authorize(credentials) {
				const ticket =
					typeof credentials.ticket === 'string' ? readTicket(env().AUTH_SECRET, credentials.ticket) : undefined;
				if (!ticket) return null;
				const user = await users.findById(getRuntime().orm.em.fork(), ticket.userId);
				if (!user || !user.active) return null;
				return { id: user.id, email: user.email, name: user.name, sv: user.sessionVersion, sid: ticket.sessionId };
			}
		})
	],
	callbacks: {
		jwt({ token, user }) {
			if (user) {
				token.uid = user.id;
				token.sv = (user as { sv?: number }).sv;
				token.sid = (user as { sid?: string }).sid;
			}
			return token;
		},
		session({ session, token }) {
			return { ...session, uid: token.uid, sv: token.sv, sid: token.sid };
		}
	}
}));
