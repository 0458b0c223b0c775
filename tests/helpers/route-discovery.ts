/**
 * Finds every API route the app serves, from the files themselves: each
 * `app/api/**\/route.ts` is one route (its folder path, with Next's
 * `[id]` and `[...rest]` segments kept as written), and each HTTP method it
 * exports is one (route, method) pair. The authorization matrix compares
 * this set with its table, so a new route or method without a row fails.
 */
import fs from 'node:fs';
import path from 'node:path';

/** The method names Next.js App Router route handlers may export. */
export const HTTP_METHODS = ['GET', 'HEAD', 'OPTIONS', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];

export type RouteFile = { route: string; file: string };
export type RouteMethod = { route: string; method: HttpMethod; file: string };

/** `app/api/v1/arrays/[id]/route.ts` → `/api/v1/arrays/[id]` (relative to the folder that holds `api`). */
export function routeOfFile(appDir: string, file: string): string {
  const rel = path.relative(appDir, path.dirname(file)).split(path.sep);
  // Route groups such as (public) do not appear in the URL.
  return '/' + rel.filter((seg) => !/^\(.*\)$/.test(seg)).join('/');
}

/** Every route.ts (or .js/.tsx) under `appDir/api`, sorted by route. */
export function findRouteFiles(appDir: string): RouteFile[] {
  const out: RouteFile[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (/^route\.(ts|tsx|js|mjs)$/.test(entry.name)) out.push({ route: routeOfFile(appDir, full), file: full });
    }
  };
  walk(path.join(appDir, 'api'));
  return out.sort((a, b) => a.route.localeCompare(b.route));
}

/** The HTTP methods a route module exports as functions (other exports such as `dynamic` are ignored). */
export function exportedMethods(mod: Record<string, unknown>): HttpMethod[] {
  return HTTP_METHODS.filter((m) => typeof mod[m] === 'function');
}

/** Imports every route file and lists its (route, method) pairs; the module is returned for calling the handlers. */
export async function discoverRoutes(
  appDir: string,
): Promise<{ pairs: RouteMethod[]; modules: Map<string, Record<string, unknown>>; empty: RouteFile[] }> {
  const pairs: RouteMethod[] = [];
  const modules = new Map<string, Record<string, unknown>>();
  const empty: RouteFile[] = [];
  for (const f of findRouteFiles(appDir)) {
    const mod = (await import(/* @vite-ignore */ f.file)) as Record<string, unknown>;
    modules.set(f.route, mod);
    const methods = exportedMethods(mod);
    if (!methods.length) empty.push(f);
    for (const method of methods) pairs.push({ route: f.route, method, file: f.file });
  }
  return { pairs, modules, empty };
}

export type TableRow = { route: string; method: string; variant?: string };

const key = (p: { route: string; method: string }) => `${p.method} ${p.route}`;

/**
 * What is wrong between the routes found and the table: a pair without a
 * main row (one without `variant`), a pair with two main rows, and a row
 * (main or variant) whose route or method the app does not export. Each
 * message names the route, the method and what to do. Empty when they agree.
 */
export function compareWithTable(found: RouteMethod[], rows: TableRow[], tableFile: string): string[] {
  const problems: string[] = [];
  const foundKeys = new Set(found.map(key));
  const main = new Map<string, number>();
  for (const r of rows) if (!r.variant) main.set(key(r), (main.get(key(r)) ?? 0) + 1);
  for (const p of found) {
    const n = main.get(key(p)) ?? 0;
    const rel = path.relative(process.cwd(), p.file);
    if (n === 0)
      problems.push(
        `${key(p)} (${rel}) has no row in the authorization matrix: add one to ${tableFile} with the expected status for every caller.`,
      );
    if (n > 1) problems.push(`${key(p)} has ${n} main rows in ${tableFile}; keep one and give the others a variant.`);
  }
  for (const r of rows) {
    if (!foundKeys.has(key(r)))
      problems.push(
        `${key(r)}${r.variant ? ` (${r.variant})` : ''} has a row in ${tableFile} but no route file exports it: remove or correct the row.`,
      );
  }
  return problems;
}

/** `/api/v1/arrays/[id]/revisions/[rev]` with {id: '3', rev: '1'} → `/api/v1/arrays/3/revisions/1`. */
export function fillRoute(route: string, params: Record<string, string | string[]>): string {
  return route.replace(/\[(\.\.\.)?([^\]]+)\]/g, (_, rest: string | undefined, name: string) => {
    const v = params[name];
    if (v === undefined) throw new Error(`route ${route} needs the parameter ${name}`);
    return rest ? ([] as string[]).concat(v).map(encodeURIComponent).join('/') : encodeURIComponent(String(v));
  });
}
