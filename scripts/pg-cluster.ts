import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

/**
 * A throwaway PostgreSQL cluster for tests and npm run scale:check: initdb in
 * a temporary folder as the current user, pg_ctl start on a free port, one
 * database; `stop()` stops it and removes the folder. The binaries come from
 * STEERWISE_PG_BIN, else Debian's /usr/lib/postgresql/<version>/bin, else PATH.
 */
export interface PgCluster {
  url: string;
  port: number;
  dir: string;
  bin: string;
  /** A URL for another database on the same cluster (created on demand). */
  createDatabase(name: string): Promise<string>;
  stop(): Promise<void>;
}

export function pgBinDir(): string | null {
  if (process.env.STEERWISE_PG_BIN) return process.env.STEERWISE_PG_BIN;
  const root = '/usr/lib/postgresql';
  if (fs.existsSync(root)) {
    const versions = fs
      .readdirSync(root)
      .filter((v) => fs.existsSync(path.join(root, v, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    if (versions.length) return path.join(root, versions[0], 'bin');
  }
  const which = spawnSync('sh', ['-c', 'command -v initdb'], { encoding: 'utf8' });
  return which.status === 0 ? path.dirname(which.stdout.trim()) : null;
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

// PostgreSQL refuses to run as root: as root, the cluster belongs to the "postgres" system user (Debian's package creates it).
const asRoot = typeof process.getuid === 'function' && process.getuid() === 0;

function run(bin: string, args: string[], env: NodeJS.ProcessEnv = process.env): Promise<string> {
  return new Promise((resolve, reject) => {
    const [cmd, argv] = asRoot ? ['runuser', ['-u', 'postgres', '--', bin, ...args]] : [bin, args];
    const child = spawn(cmd, argv, { env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (out += d));
    child.on('error', reject);
    child.on('exit', (code) =>
      code === 0 ? resolve(out) : reject(new Error(`${path.basename(bin)} exited ${code}: ${out}`)),
    );
  });
}

export async function startPgCluster({ database = 'steerwise' }: { database?: string } = {}): Promise<PgCluster> {
  const bin = pgBinDir();
  if (!bin) throw new Error('PostgreSQL binaries not found: install Debian "postgresql" or set STEERWISE_PG_BIN.');
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-pg-'));
  const data = path.join(dir, 'data');
  const user = asRoot ? 'postgres' : os.userInfo().username;
  if (asRoot) {
    const { uid, gid } = fs.statSync('/var/lib/postgresql');
    fs.chownSync(dir, uid, gid);
  }
  await run(path.join(bin, 'initdb'), ['-D', data, '-U', user, '-A', 'trust', '-E', 'UTF8', '--no-sync']);
  const port = await freePort();
  await run(path.join(bin, 'pg_ctl'), [
    '-D',
    data,
    '-l',
    path.join(dir, 'log'),
    '-w',
    '-o',
    // Throwaway: no fsync; socket in the temp folder; enough connections for several processes' pools.
    // STEERWISE_PG_OPTIONS adds server settings (diagnostics, e.g. "-c log_min_duration_statement=5").
    `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=200 ${process.env.STEERWISE_PG_OPTIONS ?? ''}`.trim(),
    'start',
  ]);
  const base = `postgres://${encodeURIComponent(user)}@127.0.0.1:${port}`;
  const createDatabase = async (name: string) => {
    await run(path.join(bin, 'createdb'), ['-h', '127.0.0.1', '-p', String(port), '-U', user, name]);
    return `${base}/${name}`;
  };
  const url = await createDatabase(database);
  return {
    url,
    port,
    dir,
    bin,
    createDatabase,
    stop: async () => {
      await run(path.join(bin, 'pg_ctl'), ['-D', data, '-m', 'immediate', '-w', 'stop']).catch(() => undefined);
      // STEERWISE_PG_KEEP_LOG=<file>: keep the server log (diagnostics) before the cluster is removed.
      if (process.env.STEERWISE_PG_KEEP_LOG) fs.copyFileSync(path.join(dir, 'log'), process.env.STEERWISE_PG_KEEP_LOG);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
