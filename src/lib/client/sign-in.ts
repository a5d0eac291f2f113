/**
 * Signs in with e-mail and password through Auth.js's credentials callback (with its CSRF token)
 * and returns where to go next, or the error code Auth.js reported.
 */
export async function signInWithPassword(email: string, password: string, callbackUrl = '/'): Promise<{ url: string; error: string | null }> {
  const { csrfToken } = (await (await fetch('/api/auth/csrf')).json()) as { csrfToken: string };
  const response = await fetch('/api/auth/callback/credentials', {
    method: 'POST',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl }),
  });
  const { url } = (await response.json()) as { url: string };
  const params = new URL(url, window.location.origin).searchParams;
  return { url, error: params.get('error') ?? (params.get('code') && params.get('code') !== 'credentials' ? params.get('code') : null) };
}
