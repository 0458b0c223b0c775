import 'server-only';

/**
 * An in-process job queue for estimate runs: one job at a time (the machine
 * the app runs on is small and the engine is CPU-bound), FIFO, kept on
 * globalThis so development reloads and the route bundles share it.
 *
 * Work runs on the server's event loop but never in one long stretch: a job
 * awaits `yieldToEventLoop()` between steps (between methods, between file
 * blocks while parsing), so other requests are served in between. Worker
 * threads were not used because Next's bundler would have to emit a separate
 * worker entry for the engine; the measured step lengths are in
 * DEVELOPERS.md ("Estimate runs").
 */
type Job = { id: string; run: () => Promise<void> };

interface QueueState {
  pending: Job[];
  active: Set<string>;
  running: boolean;
}

const state = ((globalThis as Record<string, unknown>).__steerwiseJobs ??= {
  pending: [],
  active: new Set(),
  running: false,
}) as QueueState;

/** Adds a job; the promise settles with the job's own outcome. */
export function enqueue<T>(id: string, fn: () => Promise<T>): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    state.active.add(id);
    state.pending.push({
      id,
      run: async () => {
        try {
          resolve(await fn());
        } catch (err) {
          reject(err);
        } finally {
          state.active.delete(id);
        }
      },
    });
    void drain();
  });
}

/** Whether a job with this id is queued or running in this process. */
export function isActive(id: string): boolean {
  return state.active.has(id);
}

export function queueLength(): number {
  return state.pending.length;
}

async function drain(): Promise<void> {
  if (state.running) return;
  state.running = true;
  try {
    for (let job = state.pending.shift(); job; job = state.pending.shift()) {
      await yieldToEventLoop();
      await job.run();
    }
  } finally {
    state.running = false;
  }
}

/** Lets pending I/O and other requests run before the next piece of work. */
export function yieldToEventLoop(): Promise<void> {
  return new Promise((resolve) => setImmediate(resolve));
}
