// A console session over plain fetch (the cluster suite and its bench talk to real processes, not
// to an app in this process): cookies kept by hand, the CSRF token sent on every call.
export class ConsoleSession {
  private cookies = new Map<string, string>();
  private csrf = '';
  constructor(private base: string) {}

  private take(res: Response): void {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair!.indexOf('=');
      this.cookies.set(pair!.slice(0, eq), decodeURIComponent(pair!.slice(eq + 1)));
    }
    const token = this.cookies.get('ebullio_csrf');
    if (token) this.csrf = token;
  }

  private header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${encodeURIComponent(v)}`).join('; ');
  }

  /** One call; `base` sends it to another node than the session's own address. */
  async call(method: string, path: string, body?: unknown, base = this.base): Promise<Response> {
    const res = await fetch(`${base}${path}`, {
      method,
      headers: {
        cookie: this.header(),
        'x-csrf-token': this.csrf,
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    this.take(res);
    return res;
  }

  /** Signs in; throws with the answer when the sign-in is refused. */
  async signIn(email: string, password: string): Promise<void> {
    const csrf = await this.call('GET', '/console-api/auth/csrf');
    this.csrf = ((await csrf.json()) as { csrfToken: string }).csrfToken;
    const res = await this.call('POST', '/console-api/auth/sign-in', { email, password });
    if (res.status !== 200) throw new Error(`sign-in refused: ${res.status} ${await res.text()}`);
  }

  /** A new customer account; returns its id. */
  async createAccount(name: string, monthlyUnitQuota: number): Promise<number> {
    const res = await this.call('POST', '/console-api/accounts', { name, plan: 'starter', monthlyUnitQuota });
    if (res.status !== 201) throw new Error(`account refused: ${res.status} ${await res.text()}`);
    return ((await res.json()) as { id: number }).id;
  }

  /** A new API key of the account with the given scopes; returns its id and secret. */
  async createKey(
    accountId: number,
    scopes: string[],
    rateLimitPerMinute = 100_000,
  ): Promise<{ id: number; secret: string }> {
    const res = await this.call('POST', '/console-api/keys', {
      accountId,
      name: 'cluster key',
      scopes,
      rateLimitPerMinute,
    });
    if (res.status !== 201) throw new Error(`key refused: ${res.status} ${await res.text()}`);
    const body = (await res.json()) as { key: { id: number }; secret: string };
    return { id: body.key.id, secret: body.secret };
  }
}
