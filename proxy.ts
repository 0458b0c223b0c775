import { withAuth } from 'next-auth/middleware';
import { authSecret } from '@/lib/env';

/**
 * Optimistic redirect to /login for signed-out visitors of app pages. No
 * database access here; every page, handler and data function checks the
 * caller again on the server.
 */
export default withAuth({
  pages: { signIn: '/login' },
  secret: authSecret(),
});

export const config = {
  matcher: [
    '/((?!api|_next|login|reset|invite|favicon|icon|fonts|robots\\.txt|manifest\\.webmanifest|.*\\.(?:png|svg|ico|woff2)$).*)',
  ],
};
