import { after } from 'next/server';
import { route, readBody, clientIp } from '@/lib/http';
import { ResetRequestSchema } from '@/lib/auth/schemas';
import { resendVerification } from '@/lib/accounts';

export const POST = route(async (req) => {
  const { email } = await readBody(req, ResetRequestSchema);
  return Response.json(await resendVerification(email, clientIp(req.headers), (work) => after(work)), { status: 202 });
});
