// A tiny HTTP client for API tests: keeps cookies like a browser would (per client), and sends the
// CSRF token on state-changing requests unless told not to.
export interface ApiResponse<T = any> {
  status: number;
  body: T;
  text: string;
  headers: Headers;
  setCookies: string[];
}

export class ApiClient {
  readonly cookies = new Map<string, string>();
  csrfToken: string | undefined;

  constructor(readonly baseUrl: string) {}

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  async request<T = any>(
    method: string,
    path: string,
    options: { body?: unknown; rawBody?: string; csrf?: boolean | string; headers?: Record<string, string> } = {},
  ): Promise<ApiResponse<T>> {
    const headers: Record<string, string> = { accept: 'application/json', ...options.headers };
    const stateChanging = !['GET', 'HEAD', 'OPTIONS'].includes(method.toUpperCase());
    if (stateChanging && options.csrf !== false) {
      if (typeof options.csrf === 'string') headers['x-csrf-token'] = options.csrf;
      else headers['x-csrf-token'] = this.csrfToken ?? (await this.fetchCsrf());
    }
    let body: string | undefined;
    if (options.rawBody !== undefined) body = options.rawBody;
    else if (options.body !== undefined) body = JSON.stringify(options.body);
    if (body !== undefined) headers['content-type'] = 'application/json';
    const cookie = this.cookieHeader();
    if (cookie) headers.cookie = cookie;
    const res = await fetch(this.baseUrl + path, { method, headers, body, redirect: 'manual' });
    const setCookies = res.headers.getSetCookie();
    for (const sc of setCookies) {
      const [pair, ...attrs] = sc.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*expires=/i.test(a) && Date.parse(a.split('=')[1]) < Date.now()) || value === '';
      if (expired) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    const text = await res.text();
    let parsed: any = undefined;
    try {
      parsed = text ? JSON.parse(text) : undefined;
    } catch {
      parsed = undefined;
    }
    if (parsed && typeof parsed.csrfToken === 'string') this.csrfToken = parsed.csrfToken;
    return { status: res.status, body: parsed as T, text, headers: res.headers, setCookies };
  }

  async fetchCsrf(): Promise<string> {
    const res = await this.request<{ csrfToken: string }>('GET', '/api/csrf');
    if (res.status !== 200) throw new Error(`GET /api/csrf gave ${res.status}`);
    return res.body.csrfToken;
  }

  get<T = any>(path: string) {
    return this.request<T>('GET', path);
  }

  async signIn(email: string, password: string): Promise<ApiResponse> {
    return this.request('POST', '/api/session', { body: { email, password } });
  }
}
