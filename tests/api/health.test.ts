import { describe, expect, it } from 'vitest';
import { GET } from '@/app/api/health/route';

describe('GET /api/health (docs/conventions.md §7)', () => {
  it('answers {"status":"ok","db":"ok"} when the database answers', async () => {
    const res = await GET();
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: 'ok', db: 'ok' });
  });

  it('answers 503 with db "error" when the database cannot be opened', async () => {
    const saved = process.env.STEERWISE_DB;
    // A path under a regular file can never be created or opened.
    process.env.STEERWISE_DB = `${saved}/not-a-directory/db.sqlite`;
    try {
      const res = await GET();
      expect(res.status).toBe(503);
      expect(await res.json()).toEqual({ status: 'error', db: 'error' });
    } finally {
      process.env.STEERWISE_DB = saved;
    }
  });
});
