import type { APIRoute } from 'astro';
import { AstroAuth } from 'auth-astro/server';
import { CLIENT_ADDRESS_HEADER } from '../../../consts';
import { publicUrl } from '../../../lib/server/public-origin';
import { respond } from '../../../lib/server/http';
import { BODY_LIMITS, readBody } from '../../../lib/server/request-body';

const { GET: authGet, POST: authPost } = AstroAuth();

/**
 * Hands Auth.js a copy of the request on the public URL (its links, redirects and cookie names
 * follow that URL), with the real client address (for sign-in rate limits, replacing any forged
 * copy) and a body read within the small auth limit (Auth.js would read any size).
 */
function forAuth(handler: typeof authGet): APIRoute {
  return async (context) => {
    const headers = new Headers(context.request.headers);
    headers.set(CLIENT_ADDRESS_HEADER, context.clientAddress);
    const body = await readBody(context.request, BODY_LIMITS.auth);
    if (!body.ok) return respond(body);
    const { method } = context.request;
    const request = new Request(publicUrl(context.request.url), { method, headers, body: method === 'GET' || method === 'HEAD' ? undefined : body.value });
    return (await handler({ ...context, request })) ?? new Response('Not found', { status: 404 });
  };
}

export const GET = forAuth(authGet);
export const POST = forAuth(authPost);
