import { route, readBody, clientIp } from '@/lib/http';
import { VerifySchema } from '@/lib/auth/schemas';
import { verifyEmail } from '@/lib/accounts';

export const POST = route(async (req) => {
  const { token } = await readBody(req, VerifySchema);
  const { email } = await verifyEmail(token, clientIp(req.headers));
  return Response.json({ message: `Your e-mail ${email} is confirmed. You can sign in now.` });
});
