/**
 * Where the pipeline's time goes: `npx tsx scripts/profile-pipeline.ts` prints the median
 * of the covariance, the Hermitian EVD and LS-ESPRIT separately for the bench sizes
 * (single thread). For a CPU profile: `node --cpu-prof --import tsx scripts/profile-pipeline.ts`.
 */
import { sampleCovariance } from '../lib/doa/covariance';
import { hermitianEigen } from '../lib/doa/linalg/hermitian-eigen';
import { espritLsElectricalAngles, signalSubspace } from '../lib/doa/methods/esprit';
import { simulateSnapshots } from '../lib/doa/sim/simulate';

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}
function time(fn: () => unknown, reps: number): number {
  for (let i = 0; i < 3; i++) fn();
  const t: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return median(t);
}
for (const [m, n] of [
  [16, 1000],
  [64, 10000],
  [128, 20000],
] as const) {
  const x = simulateSnapshots({
    elements: m,
    spacingWavelengths: 0.5,
    bearingsDeg: [-20, 15],
    noisePower: 1,
    snapshots: n,
    seed: 1,
  });
  const r = sampleCovariance(x);
  const eig = hermitianEigen(r);
  const reps = m === 16 ? 50 : 9;
  const cov = time(() => sampleCovariance(x), reps);
  const evd = time(() => hermitianEigen(r), reps);
  const esp = time(() => espritLsElectricalAngles(signalSubspace(eig.vectors, 2)), reps);
  console.log(
    JSON.stringify({
      case: `${m}x${n}`,
      covarianceMs: +cov.toFixed(3),
      evdMs: +evd.toFixed(3),
      espritMs: +esp.toFixed(3),
    }),
  );
}
