/**
 * The files a deployed app serves without a session: favicon, icons, the web
 * app manifest and robots.txt (public/ and app/manifest.ts), and the page head
 * points at them.
 */
import { describe, expect, inject, it } from 'vitest';

const baseUrl = inject('baseUrl');

describe('public files', () => {
  it('are served to anonymous visitors with their content types', async () => {
    const cases: [string, RegExp, (b: Buffer) => boolean][] = [
      [
        '/favicon.ico',
        /image\/(x-icon|vnd\.microsoft\.icon)/,
        (b) => b.readUInt16LE(2) === 1 && b.readUInt16LE(4) === 3,
      ],
      ['/icon.svg', /image\/svg\+xml/, (b) => b.toString().includes('<svg')],
      ['/apple-touch-icon.png', /image\/png/, (b) => b.subarray(1, 4).toString() === 'PNG'],
      ['/icon-192.png', /image\/png/, (b) => b.readUInt32BE(16) === 192],
      ['/icon-512.png', /image\/png/, (b) => b.readUInt32BE(16) === 512],
      ['/robots.txt', /text\/plain/, (b) => /User-agent: \*\s+Disallow: \//.test(b.toString())],
      ['/manifest.webmanifest', /application\/manifest\+json/, (b) => JSON.parse(b.toString()).name === 'Steerwise'],
    ];
    for (const [path, type, ok] of cases) {
      const res = await fetch(new URL(path, baseUrl), { redirect: 'manual' });
      expect(res.status, path).toBe(200);
      expect(res.headers.get('content-type'), path).toMatch(type);
      expect(ok(Buffer.from(await res.arrayBuffer())), path).toBe(true);
    }
    const login = await (await fetch(new URL('/login', baseUrl))).text();
    expect(login).toContain('href="/favicon.ico"');
    expect(login).toContain('href="/apple-touch-icon.png"');
    expect(login).toContain('href="/manifest.webmanifest"');
  });
});
