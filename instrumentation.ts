/**
 * Runs once when a Next.js server starts. On the Node.js runtime, when no real
 * relay is configured (SMTP_HOST unset), start the local SMTP sink that stores
 * mail for the admin Outbox page.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME === 'nodejs' && !process.env.SMTP_HOST && process.env.STEERWISE_MAIL_SINK !== 'off') {
    const { ensureSmtpSink } = await import('./lib/mail/outbox');
    await ensureSmtpSink()?.catch(() => undefined);
  }
}
