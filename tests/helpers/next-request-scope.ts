/**
 * Calls an App Router route handler the way `next start` does: with a
 * NextRequest, inside Next's work store and request store, so handlers that
 * read `cookies()`/`headers()` from next/headers (next-auth's catch-all
 * route) work in a plain vitest process.
 *
 * This uses internal Next.js modules (next/dist/server/…: the work and
 * request async storages and their store factories); if a Next upgrade
 * moves them, this helper is the one place to adapt. Next itself installs `globalThis.AsyncLocalStorage`
 * before loading them; tests/helpers/api-setup.ts does the same.
 */
import { AsyncLocalStorage } from 'node:async_hooks';

(globalThis as { AsyncLocalStorage?: unknown }).AsyncLocalStorage ??= AsyncLocalStorage;

type NextInternals = {
  NextRequest: typeof import('next/server').NextRequest;
  workAsyncStorage: { run<R>(store: unknown, fn: () => R): R };
  workUnitAsyncStorage: { run<R>(store: unknown, fn: () => R): R };
  createWorkStore: (ctx: unknown) => unknown;
  createRequestStoreForAPI: (req: unknown, url: URL, tags: unknown, onUpdate: unknown, preview: unknown) => unknown;
};

let internals: Promise<NextInternals> | null = null;

function loadInternals(): Promise<NextInternals> {
  internals ??= (async () => {
    const { NextRequest } = await import('next/server');
    const work = await import('next/dist/server/app-render/work-async-storage.external');
    const unit = await import('next/dist/server/app-render/work-unit-async-storage.external');
    const workStore = await import('next/dist/server/async-storage/work-store');
    const requestStore = await import('next/dist/server/async-storage/request-store');
    return {
      NextRequest,
      workAsyncStorage: work.workAsyncStorage as unknown as NextInternals['workAsyncStorage'],
      workUnitAsyncStorage: unit.workUnitAsyncStorage as unknown as NextInternals['workUnitAsyncStorage'],
      createWorkStore: workStore.createWorkStore as unknown as NextInternals['createWorkStore'],
      createRequestStoreForAPI:
        requestStore.createRequestStoreForAPI as unknown as NextInternals['createRequestStoreForAPI'],
    };
  })();
  return internals;
}

export type RouteHandler = (
  req: Request,
  ctx: { params: Promise<Record<string, string | string[]>> },
) => Promise<Response>;

/** Runs `handler` on a NextRequest built from `url`/`init`, inside a route-handler request scope for `page`. */
export async function callRouteHandler(
  page: string,
  handler: RouteHandler,
  url: string,
  init: RequestInit,
  params: Record<string, string | string[]>,
): Promise<Response> {
  const next = await loadInternals();
  const request = new next.NextRequest(url, init as ConstructorParameters<typeof next.NextRequest>[1]);
  const work = next.createWorkStore({
    page: `${page}/route`,
    renderOpts: { experimental: {} },
    isPrefetchRequest: false,
    buildId: 'test',
    previouslyRevalidatedTags: [],
  });
  const store = next.createRequestStoreForAPI(request, new URL(request.url), undefined, undefined, undefined);
  return next.workAsyncStorage.run(work, () =>
    next.workUnitAsyncStorage.run(store, () => handler(request, { params: Promise.resolve(params) })),
  );
}
