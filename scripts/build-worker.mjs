// Bundles the compute worker entry (lib/jobs/worker.ts) with esbuild into one
// CommonJS file. `npm run build` writes dist/jobs-worker.cjs (found by
// lib/jobs/pool.ts under next start); in development and tests the pool calls
// buildWorker() itself into node_modules/.cache. npm packages stay external
// and load from node_modules at run time.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import * as esbuild from 'esbuild';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

export async function buildWorker(
  outfile = path.join(root, 'dist', 'jobs-worker.cjs'),
  { inlineSourceMap = false } = {},
) {
  await esbuild.build({
    entryPoints: [path.join(root, 'lib', 'jobs', 'worker.ts')],
    outfile,
    bundle: true,
    platform: 'node',
    target: 'node20',
    // CommonJS output, so the npm packages (several are CommonJS) load with require() as under tsx.
    format: 'cjs',
    packages: 'external',
    sourcemap: inlineSourceMap ? 'inline' : 'linked',
    logLevel: 'warning',
    alias: { '@': root },
  });
  return outfile;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const out = await buildWorker(process.argv[2] ? path.resolve(process.argv[2]) : undefined);
  console.log(`compute worker bundled: ${path.relative(process.cwd(), out)}`);
}
