/**
 * Browser-test setup: builds the app when the build is missing or older than
 * the sources, migrates and seeds a temporary database, then starts
 * `next start` on a free port with its own SMTP sink on another free port.
 * The teardown stops the server (its whole process group) and removes the
 * temporary folder.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';

const root = path.resolve(__dirname, '../..');

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
  }
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

function newestSource(): number {
  let newest = 0;
  const walk = (p: string) => {
    const st = fs.statSync(p);
    if (st.isDirectory()) {
      for (const entry of fs.readdirSync(p)) walk(path.join(p, entry));
    } else newest = Math.max(newest, st.mtimeMs);
  };
  for (const p of [
    'app',
    'components',
    'lib',
    'models',
    'proxy.ts',
    'instrumentation.ts',
    'next.config.mjs',
    'tailwind.config.ts',
    'postcss.config.mjs',
    'package.json',
  ]) {
    const full = path.join(root, p);
    if (fs.existsSync(full)) walk(full);
  }
  return newest;
}

function buildIfNeeded(): void {
  // The compute worker bundle (dist/jobs-worker.cjs) that next start loads; esbuild takes well under a second.
  const worker = spawnSync(process.execPath, [path.join(root, 'scripts', 'build-worker.mjs')], {
    cwd: root,
    encoding: 'utf8',
  });
  if (worker.status !== 0) throw new Error(`building the compute worker failed:\n${worker.stderr}`);
  const buildId = path.join(root, '.next', 'BUILD_ID');
  if (fs.existsSync(buildId) && fs.statSync(buildId).mtimeMs > newestSource() && !process.env.STEERWISE_E2E_REBUILD)
    return;
  fs.mkdirSync(path.join(root, 'test-results'), { recursive: true });
  const log = path.join(root, 'test-results', 'e2e-build.log');
  console.log(`[e2e] building the app (next build); log in ${path.relative(root, log)}`);
  const res = spawnSync(process.execPath, [path.join(root, 'node_modules/next/dist/bin/next'), 'build'], {
    cwd: root,
    encoding: 'utf8',
    env: { ...process.env, NODE_ENV: 'production', NEXT_TELEMETRY_DISABLED: '1' },
    maxBuffer: 64 * 1024 * 1024,
  });
  fs.writeFileSync(log, `${res.stdout}\n${res.stderr}`);
  if (res.status !== 0)
    throw new Error(`next build failed (exit ${res.status}):\n${`${res.stdout}\n${res.stderr}`.slice(-4000)}`);
}

function runScript(script: string, env: NodeJS.ProcessEnv): void {
  const res = spawnSync(process.execPath, [path.join(root, 'node_modules/tsx/dist/cli.mjs'), script], {
    cwd: root,
    env,
    encoding: 'utf8',
  });
  if (res.status !== 0) throw new Error(`${script} failed:\n${res.stdout}\n${res.stderr}`);
}

async function waitForHealth(url: string, server: ChildProcess, output: () => string): Promise<void> {
  const deadline = Date.now() + 90_000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`next start exited early (${server.exitCode}):\n${output()}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`the app did not become healthy in 90 s:\n${output()}`);
}

/**
 * Only one browser-test run may build and serve from .next at a time (a
 * second `next build` would rewrite the files under a running server), so
 * runs take a lock directory holding the owner's pid; a lock whose owner is
 * gone is taken over.
 */
const lockDir = path.join(root, 'test-results', '.e2e-lock');

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

async function acquireLock(): Promise<() => void> {
  fs.mkdirSync(path.dirname(lockDir), { recursive: true });
  const deadline = Date.now() + 30 * 60_000;
  let told = false;
  for (;;) {
    try {
      fs.mkdirSync(lockDir);
      fs.writeFileSync(path.join(lockDir, 'pid'), String(process.pid));
      return () => fs.rmSync(lockDir, { recursive: true, force: true });
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
    const owner = Number(fs.readFileSync(path.join(lockDir, 'pid'), { encoding: 'utf8', flag: 'a+' }) || 0);
    if (owner && !alive(owner)) {
      fs.rmSync(lockDir, { recursive: true, force: true });
      continue;
    }
    if (Date.now() > deadline)
      throw new Error(`another browser-test run (pid ${owner}) has held ${lockDir} for 30 minutes`);
    if (!told) {
      console.log(`[e2e] waiting for another browser-test run (pid ${owner || '?'}) to finish`);
      told = true;
    }
    await new Promise((r) => setTimeout(r, 2000));
  }
}

export default async function setup(project: TestProject) {
  const release = await acquireLock();
  try {
    buildIfNeeded();
  } catch (err) {
    release();
    throw err;
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-e2e-'));
  const [appPort, sinkPort] = [await freePort(), await freePort()];
  const baseUrl = `http://127.0.0.1:${appPort}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    NEXT_TELEMETRY_DISABLED: '1',
    STEERWISE_DATA_DIR: dir,
    STEERWISE_DB: path.join(dir, 'e2e.sqlite'),
    SMTP_SINK_PORT: String(sinkPort),
    NEXTAUTH_URL: baseUrl,
    NEXTAUTH_SECRET: `e2e-${Date.now()}-${Math.random()}`,
    STEERWISE_SIGNIN_LIMIT_IP: '200',
  };
  delete env.SMTP_HOST;
  try {
    runScript('scripts/migrate.ts', env);
    runScript('scripts/seed.ts', env);
  } catch (err) {
    fs.rmSync(dir, { recursive: true, force: true });
    release();
    throw err;
  }

  let output = '';
  const server = spawn(
    process.execPath,
    [path.join(root, 'node_modules/next/dist/bin/next'), 'start', '-p', String(appPort), '-H', '127.0.0.1'],
    { cwd: root, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] },
  );
  server.stdout!.on('data', (d) => (output += d));
  server.stderr!.on('data', (d) => (output += d));
  const stop = async () => {
    if (server.exitCode === null && server.pid) {
      try {
        process.kill(-server.pid, 'SIGTERM');
      } catch {
        /* already gone */
      }
      await new Promise((r) => setTimeout(r, 500));
      if (server.exitCode === null) {
        try {
          process.kill(-server.pid, 'SIGKILL');
        } catch {
          /* already gone */
        }
      }
    }
    fs.writeFileSync(path.join(root, 'test-results', 'e2e-server.log'), output);
    fs.rmSync(dir, { recursive: true, force: true });
    release();
  };
  try {
    await waitForHealth(baseUrl, server, () => output);
  } catch (err) {
    await stop();
    throw err;
  }
  project.provide('baseUrl', baseUrl);
  return stop;
}
