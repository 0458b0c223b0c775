import { getDb } from '@/lib/db';

export const dynamic = 'force-dynamic';

/** GET /api/health → {"status":"ok","db":"ok"} (docs/conventions.md §7); 503 with db "error" when the database does not answer. */
export async function GET() {
  try {
    const db = await getDb();
    await db.query('SELECT 1');
    return Response.json({ status: 'ok', db: 'ok' }, { headers: { 'cache-control': 'no-store' } });
  } catch (err) {
    console.error('[steerwise] health check: database error', err);
    return Response.json({ status: 'error', db: 'error' }, { status: 503, headers: { 'cache-control': 'no-store' } });
  }
}
