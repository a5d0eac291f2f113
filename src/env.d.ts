/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    /** Who is asking: a signed-in user or an API token; null when nobody is. */
    identity: import('./lib/server/access').Identity | null;
    /** The team the user is working in (chosen by cookie, else their first). */
    team: import('./lib/server/access').TeamMembership | null;
    /** The route pattern (`/api/sheets/[sheetId]`) for request logs and metrics. */
    route?: string;
    /** The quoted numbers of the worked example being rendered, by marker key (src/lib/examples/quotes.ts); set by its page. */
    exampleQuotes?: ReadonlyMap<string, import('./lib/examples/quotes').Quote>;
  }
}
