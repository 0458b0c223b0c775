/**
 * Runs once when a Next.js server starts, on the Node.js runtime:
 * - sweeps leftovers of a killed server from the data folder, recovers its
 *   jobs and starts the job runner (lib/jobs/start.ts);
 * - when no real relay is configured (SMTP_HOST unset), starts the local SMTP
 *   sink that stores mail for the admin Outbox page.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  if (process.env.STEERWISE_JOBS !== 'off') {
    const { startServerJobs } = await import('./lib/jobs/start');
    await startServerJobs().catch((err) => console.error('[steerwise] job runner did not start', err));
  }
  if (!process.env.SMTP_HOST && process.env.STEERWISE_MAIL_SINK !== 'off') {
    const { ensureSmtpSink } = await import('./lib/mail/outbox');
    await ensureSmtpSink()?.catch(() => undefined);
  }
}
