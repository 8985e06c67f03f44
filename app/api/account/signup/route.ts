import { after } from 'next/server';
import { route, readBody, clientIp } from '@/lib/http';
import { SignUpSchema } from '@/lib/auth/schemas';
import { signUp } from '@/lib/accounts';

export const POST = route(async (req) => {
  const input = await readBody(req, SignUpSchema);
  return Response.json(await signUp(input, clientIp(req.headers), (work) => after(work)), { status: 202 });
});
