import { route, clientIp } from '@/lib/http';
import { requireUser } from '@/lib/auth/guard';
import { signOutEverywhere } from '@/lib/accounts';

/** "Sign out everywhere": ends every session of the signed-in account, this one included. */
export const DELETE = route(async (req) => {
  const user = await requireUser();
  await signOutEverywhere(user, clientIp(req.headers));
  return Response.json({ message: 'You are signed out on every device. Sign in again to continue.' });
});
