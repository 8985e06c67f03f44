import { route, readBody, clientIp } from '@/lib/http';
import { ResetConfirmSchema } from '@/lib/auth/schemas';
import { confirmPasswordReset } from '@/lib/accounts';

export const POST = route(async (req) => {
  const { token, password } = await readBody(req, ResetConfirmSchema);
  await confirmPasswordReset(token, password, clientIp(req.headers));
  return Response.json({ message: 'Your new password is saved. Sign in with it.' });
});
