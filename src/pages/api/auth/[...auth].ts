import type { APIRoute } from 'astro';
import { AstroAuth } from 'auth-astro/server';
import { CLIENT_ADDRESS_HEADER } from '../../../consts';

const { GET: authGet, POST: authPost } = AstroAuth();

/** Passes the real client address to Auth.js (for sign-in rate limits) and drops any forged copy. */
function withClientAddress(handler: typeof authGet): APIRoute {
  return async (context) => {
    const headers = new Headers(context.request.headers);
    headers.set(CLIENT_ADDRESS_HEADER, context.clientAddress);
    const request = new Request(context.request, { headers });
    return (await handler({ ...context, request })) ?? new Response('Not found', { status: 404 });
  };
}

export const GET = withClientAddress(authGet);
export const POST = withClientAddress(authPost);
