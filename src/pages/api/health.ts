import type { APIRoute } from 'astro';
import { getDatabase } from '../../lib/server/database';
import { checkHealth } from '../../lib/server/health';

export const GET = (async () => {
  const health = await checkHealth(await getDatabase());
  return Response.json(health, { status: health.status === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } });
}) satisfies APIRoute;
