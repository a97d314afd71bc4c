import { withAuth } from 'next-auth/middleware';

// Early redirect for signed-out visitors; the real checks (role, active account) run again in every
// page and route handler.
export default withAuth({ pages: { signIn: '/sign-in' } });

export const config = {
  matcher: ['/((?!api|_next|fonts|favicon.ico|icon.svg|sign-in|invitations|forbidden).*)'],
};
