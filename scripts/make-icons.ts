/**
 * Renders public/icon.svg to the PNG icons and favicon.ico in public/ with
 * headless Chromium (playwright-core, as the browser tests use). Run after
 * changing the SVG: npx tsx scripts/make-icons.ts
 * favicon.ico holds 16, 32 and 48 px PNG images (the ICO container allows PNG entries).
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';

const PUBLIC = path.resolve(__dirname, '../public');
const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run'];

async function main() {
  const svg = fs.readFileSync(path.join(PUBLIC, 'icon.svg'), 'utf8');
  const browser = await chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
  const render = async (size: number, padded = false): Promise<Buffer> => {
    const page = await browser.newPage({ viewport: { width: size, height: size } });
    const inner = padded ? Math.round(size * 0.84) : size;
    await page.setContent(
      `<html><body style="margin:0;background:${padded ? '#111c28' : 'transparent'};display:grid;place-items:center;width:${size}px;height:${size}px">` +
        svg.replace('<svg ', `<svg width="${inner}" height="${inner}" `) +
        '</body></html>',
    );
    const png = await page.screenshot({ omitBackground: !padded, clip: { x: 0, y: 0, width: size, height: size } });
    await page.close();
    return png;
  };
  try {
    fs.writeFileSync(path.join(PUBLIC, 'icon-192.png'), await render(192));
    fs.writeFileSync(path.join(PUBLIC, 'icon-512.png'), await render(512));
    // Apple draws its own rounded corners: a full-bleed tile.
    fs.writeFileSync(path.join(PUBLIC, 'apple-touch-icon.png'), await render(180, true));
    const images = [16, 32, 48];
    const pngs: Buffer[] = [];
    for (const s of images) pngs.push(await render(s));
    const header = Buffer.alloc(6 + 16 * images.length);
    header.writeUInt16LE(0, 0);
    header.writeUInt16LE(1, 2); // icon
    header.writeUInt16LE(images.length, 4);
    let offset = header.length;
    images.forEach((s, i) => {
      const e = 6 + 16 * i;
      header.writeUInt8(s, e);
      header.writeUInt8(s, e + 1);
      header.writeUInt16LE(1, e + 4); // colour planes
      header.writeUInt16LE(32, e + 6); // bits per pixel
      header.writeUInt32LE(pngs[i].length, e + 8);
      header.writeUInt32LE(offset, e + 12);
      offset += pngs[i].length;
    });
    fs.writeFileSync(path.join(PUBLIC, 'favicon.ico'), Buffer.concat([header, ...pngs]));
  } finally {
    await browser.close();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
