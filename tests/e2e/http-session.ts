/** Cookie sessions over plain HTTP against the built app, for tests and scripts that need no browser. */

/** name=value pairs from a response's Set-Cookie headers, merged into `jar`. */
export function keepCookies(response: Response, jar: Map<string, string>): void {
  for (const line of response.headers.getSetCookie()) {
    const [pair] = line.split(';');
    const at = pair.indexOf('=');
    jar.set(pair.slice(0, at), pair.slice(at + 1));
  }
}

/** The Cookie header for a jar. */
export const cookieHeader = (jar: Map<string, string>) => [...jar].map(([name, value]) => `${name}=${value}`).join('; ');

/** Signs in through Auth.js's credentials callback the way the sign-in form does; returns the cookie jar and the answer. */
export async function signInOverHttp(baseUrl: string, origin: string, email: string, password: string, headers: Record<string, string> = {}) {
  const jar = new Map<string, string>();
  const csrf = await fetch(`${baseUrl}/api/auth/csrf`, { headers });
  keepCookies(csrf, jar);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const response = await fetch(`${baseUrl}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { ...headers, origin, cookie: cookieHeader(jar), 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl: `${origin}/sheets` }),
  });
  keepCookies(response, jar);
  return { jar, response };
}
