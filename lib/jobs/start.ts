import 'server-only';
import { startJobRunner, recoverStaleJobs } from '.';
import { sweepDataFolder } from '../storage/sweep';
import { warmPool } from './pool';
import { isSnapshotSetReferenced, snapshotsDir } from '../storage/snapshots';
// Importing the data modules registers their job kinds.
import '../data/estimates';
import '../data/studies';
import '../data/datasets';
import { btrFilesDir, isBtrFileReferenced } from '../data/bearing-time-records';
import '../data/calibrations';

/**
 * Server start (instrumentation.ts): remove what a killed server left in the
 * data folder, recover jobs whose process died, then start this process's
 * job runner so queued and recovered jobs run without waiting for a request, and start
 * the compute pool's threads (the first estimate then finds them loaded).
 */
export async function startServerJobs(): Promise<void> {
  const { removed } = await sweepDataFolder([
    { dir: snapshotsDir(), referenced: isSnapshotSetReferenced },
    { dir: btrFilesDir(), referenced: isBtrFileReferenced },
  ]);
  if (removed.length) console.log(`[steerwise] removed ${removed.length} leftover file(s) from the data folder`);
  const recovered = await recoverStaleJobs();
  if (recovered.requeued || recovered.failed || recovered.removed) {
    console.log(
      `[steerwise] jobs of a stopped server: ${recovered.requeued} re-queued, ${recovered.failed} failed, ${recovered.removed} removed`,
    );
  }
  startJobRunner();
  warmPool();
}
