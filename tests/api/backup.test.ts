/**
 * Backup and restore (lib/backup, npm run backup / restore): the seeded demo
 * folder (database, recordings, a snapshot set) round-trips with every table
 * row and every file identical (a consistency check of the product against
 * itself); damaged, foreign and non-empty targets are refused with a message.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import JSZip from 'jszip';
import sqlite3 from 'sqlite3';
import { describe, expect, it } from 'vitest';
import * as estimates from '@/app/api/v1/estimates/route';
import { BackupError, createBackup, restoreBackup } from '@/lib/backup';
import { browserHeaders, params, req } from '../helpers/api';

function dump(file: string): Promise<Record<string, unknown[]>> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY);
    db.all(
      "SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name",
      async (err, tables: { name: string }[]) => {
        if (err) return reject(err);
        const out: Record<string, unknown[]> = {};
        for (const { name } of tables) {
          out[name] = await new Promise<unknown[]>((res, rej) =>
            db.all(`SELECT * FROM "${name}" ORDER BY rowid`, (e, rows) => (e ? rej(e) : res(rows))),
          );
        }
        db.close();
        resolve(out);
      },
    );
  });
}

function files(root: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(path.join(root, dir), { withFileTypes: true })) {
      const rel = path.join(dir, e.name);
      if (e.isDirectory()) walk(rel);
      else out[rel] = fs.readFileSync(path.join(root, rel)).toString('base64');
    }
  };
  for (const d of ['datasets', 'snapshots']) if (fs.existsSync(path.join(root, d))) walk(d);
  return out;
}

describe('backup and restore', () => {
  it('round-trips the demo: every table and every stored file identical; the restored database passes integrity_check', async () => {
    // One inline run, so a snapshot set is among the files.
    const body = {
      method: 'esprit-ls',
      sourceCount: 1,
      array: { elements: 3, spacingWavelengths: 0.5 },
      snapshots: {
        re: [
          [1, 0, -1],
          [0, 1, 0],
          [1, 1, 1],
          [0.5, -0.5, 0.2],
        ],
        im: [
          [0, 1, 0],
          [1, 0, -1],
          [0, 0, 0],
          [0.1, 0.2, 0.3],
        ],
      },
    };
    const res = await estimates.POST(
      req('POST', '/api/v1/estimates', { body, headers: await browserHeaders('engineer') }),
      params({}),
    );
    expect(res.status).toBe(201);
    const dataDir = process.env.STEERWISE_DATA_DIR!;
    const dbFile = process.env.STEERWISE_DB!;
    const work = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-restore-'));
    const archive = path.join(work, 'backup.zip');
    const manifest = await createBackup({ dataDir, dbFile, out: archive });
    expect(manifest.files.some((f) => f.path.startsWith('files/snapshots/'))).toBe(true);
    expect(manifest.files.some((f) => f.path.startsWith('files/datasets/'))).toBe(true);
    const target = path.join(work, 'restored');
    await restoreBackup({ archive, dataDir: target, dbFile: path.join(target, 'steerwise.sqlite') });
    expect(await dump(path.join(target, 'steerwise.sqlite'))).toEqual(await dump(dbFile));
    expect(files(target)).toEqual(files(dataDir));

    // Restoring again into the now non-empty folder is refused.
    await expect(restoreBackup({ archive, dataDir: target, dbFile: path.join(target, 'x.sqlite') })).rejects.toThrow(
      /not empty/,
    );

    // A damaged archive: one byte of a stored file changed (the zip rebuilt so only the content differs).
    const zip = await JSZip.loadAsync(fs.readFileSync(archive));
    const victim = manifest.files.find((f) => f.path.startsWith('files/datasets/'))!.path;
    const data = await zip.file(victim)!.async('nodebuffer');
    data[0] ^= 0xff;
    zip.file(victim, data);
    const damaged = path.join(work, 'damaged.zip');
    fs.writeFileSync(damaged, await zip.generateAsync({ type: 'nodebuffer' }));
    const empty = path.join(work, 'empty');
    await expect(
      restoreBackup({ archive: damaged, dataDir: empty, dbFile: path.join(empty, 'db.sqlite') }),
    ).rejects.toThrow(new RegExp(`${victim.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} does not match its SHA-256`));
    // A truncated archive and a foreign zip.
    const truncated = path.join(work, 'truncated.zip');
    fs.writeFileSync(truncated, fs.readFileSync(archive).subarray(0, 1000));
    await expect(
      restoreBackup({ archive: truncated, dataDir: empty, dbFile: path.join(empty, 'db.sqlite') }),
    ).rejects.toBeInstanceOf(BackupError);
    const foreign = new JSZip();
    foreign.file('readme.txt', 'hello');
    const foreignFile = path.join(work, 'foreign.zip');
    fs.writeFileSync(foreignFile, await foreign.generateAsync({ type: 'nodebuffer' }));
    await expect(
      restoreBackup({ archive: foreignFile, dataDir: empty, dbFile: path.join(empty, 'db.sqlite') }),
    ).rejects.toThrow(/not a Steerwise backup/);
    expect(fs.existsSync(empty)).toBe(false);
    fs.rmSync(work, { recursive: true, force: true });
  });
});
