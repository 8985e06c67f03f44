/** A tiny HTTP client with a cookie jar, speaking to the running app like a browser would. */
export class Client {
  private cookies = new Map<string, string>();
  constructor(public readonly base: string, public readonly ip = `10.9.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`) {}

  private cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  async request(path: string, init: RequestInit & { json?: unknown } = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    headers.set('x-forwarded-for', this.ip);
    if (this.cookies.size) headers.set('cookie', this.cookieHeader());
    let body = init.body;
    if (init.json !== undefined) {
      headers.set('content-type', 'application/json');
      body = JSON.stringify(init.json);
    }
    const res = await fetch(this.base + path, { ...init, headers, body, redirect: 'manual' });
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const i = pair.indexOf('=');
      const name = pair.slice(0, i);
      const value = pair.slice(i + 1);
      if (value === '' || /max-age=0/i.test(c)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    return res;
  }

  get = (path: string) => this.request(path);
  post = (path: string, json: unknown) => this.request(path, { method: 'POST', json });
  put = (path: string, json: unknown) => this.request(path, { method: 'PUT', json });

  /** Signs in through next-auth's credentials callback, as the sign-in form does. */
  async signIn(email: string, password: string): Promise<Response> {
    const csrf = (await (await this.get('/api/auth/csrf')).json()) as { csrfToken: string };
    const form = new URLSearchParams({ email, password, csrfToken: csrf.csrfToken, json: 'true', callbackUrl: '/' });
    return this.request('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: form.toString(),
    });
  }

  hasSession() {
    return [...this.cookies.keys()].some((k) => k.endsWith('next-auth.session-token'));
  }
}
