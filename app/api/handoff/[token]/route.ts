import { ApiError, toErrorResponse } from '@/lib/http';
import { downloadHandoff } from '@/lib/data/handoffs';

type Ctx = { params: Promise<{ token: string }> };

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/**
 * GET /api/handoff/{token}: the bundle of a hand-off, for whoever holds the
 * signed link (no sign-in). An altered or unknown link is 404, an expired
 * one 422 link_expired; a browser gets the same message as a small page.
 */
export async function GET(req: Request, ctx: Ctx): Promise<Response> {
  const { token } = await ctx.params;
  try {
    const { zip, fileName, sha256 } = await downloadHandoff({ token: decodeURIComponent(token) });
    return new Response(Buffer.from(zip), {
      headers: {
        'content-type': 'application/zip',
        'content-disposition': `attachment; filename="${fileName}"`,
        'content-length': String(zip.byteLength),
        'x-bundle-sha256': sha256,
        'cache-control': 'no-store',
      },
    });
  } catch (err) {
    const res = toErrorResponse(err);
    if (err instanceof ApiError && /text\/html/.test(req.headers.get('accept') ?? '')) {
      const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Hand-off link refused · Steerwise</title><meta name="viewport" content="width=device-width,initial-scale=1"></head><body style="font-family:system-ui,sans-serif;max-width:36rem;margin:4rem auto;padding:0 1rem;color:#1f2937"><h1 style="font-size:1.25rem">This hand-off link cannot be used</h1><p role="alert">${esc(err.message)}</p><p><a href="/">Go to Steerwise</a></p></body></html>`;
      return new Response(html, { status: res.status, headers: { 'content-type': 'text/html; charset=utf-8' } });
    }
    return res;
  }
}
