/**
 * A signed-in person as the benchmark's HTTP clients see it: the session and XSRF cookies and the
 * XSRF header, exactly what the Angular client sends.
 */
export interface Session {
  email: string;
  cookie: string;
  xsrf: string;
}

function cookiesOf(res: Response): Map<string, string> {
  const out = new Map<string, string>();
  for (const c of res.headers.getSetCookie()) {
    const [pair] = c.split(';');
    const eq = pair.indexOf('=');
    out.set(pair.slice(0, eq), pair.slice(eq + 1));
  }
  return out;
}

/** Signs in through the API (GET /api/session for the XSRF cookie, then POST /api/session). */
export async function signIn(baseUrl: string, email: string, password: string): Promise<Session> {
  const first = await fetch(`${baseUrl}/api/session`);
  const xsrf = cookiesOf(first).get('XSRF-TOKEN');
  if (!xsrf) throw new Error('GET /api/session set no XSRF-TOKEN cookie');
  const res = await fetch(`${baseUrl}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-xsrf-token': xsrf, cookie: `XSRF-TOKEN=${xsrf}` },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in of ${email}: ${res.status} ${await res.text()}`);
  const set = cookiesOf(res);
  const sid = set.get('tendara.sid');
  if (!sid) throw new Error(`sign-in of ${email} set no session cookie`);
  // Sign-in rotates the XSRF token: only the new one is accepted from now on.
  const rotated = cookiesOf(res).get('XSRF-TOKEN') ?? xsrf;
  return { email, xsrf: rotated, cookie: `XSRF-TOKEN=${rotated}; tendara.sid=${sid}` };
}

/** Signs in many people, a few at a time (each sign-in is a deliberate scrypt on the server). */
export async function signInAll(baseUrl: string, emails: string[], password: string, parallel = 4): Promise<Session[]> {
  const out = new Array<Session>(emails.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: parallel }, async () => {
      while (next < emails.length) {
        const k = next++;
        out[k] = await signIn(baseUrl, emails[k], password);
      }
    }),
  );
  return out;
}

export function headersOf(s: Session, json = false): Record<string, string> {
  return { cookie: s.cookie, 'x-xsrf-token': s.xsrf, ...(json ? { 'content-type': 'application/json' } : {}) };
}

/** One JSON request as `s`; returns status and parsed body. */
export async function call<T = unknown>(baseUrl: string, s: Session, method: string, path: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(`${baseUrl}${path}`, {
    method,
    headers: headersOf(s, body !== undefined),
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: (text ? JSON.parse(text) : null) as T };
}
