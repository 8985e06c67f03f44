import { DEMO_PASSWORD, DEMO_USERS } from '@/lib/seed';

export { DEMO_PASSWORD };
export const demoEmail = (key: string) => DEMO_USERS.find((u) => u.key === key)!.email;

/** The link (path + query) in a message text, e.g. "/verify?token=…". */
export function linkIn(text: string, pathPrefix: string): string {
  const m = text.match(new RegExp(`https?://[^\\s]+(${pathPrefix.replace('/', '\\/')}\\?token=[A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`No ${pathPrefix} link in:\n${text}`);
  return m[1];
}
