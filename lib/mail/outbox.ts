import 'server-only';
import { getDb } from '../db';
import { OutboxMessage } from '@/models';
import { smtpSinkPort } from '../env';
import { startSmtpSink, type CapturedMail } from './sink';

export async function storeCapturedMail(mail: CapturedMail): Promise<void> {
  await getDb();
  await OutboxMessage.create({ ...mail, receivedAt: new Date() });
}

type SinkState = { started?: Promise<{ port: number; close: () => Promise<void> }> };
const state = ((globalThis as Record<string, unknown>).__steerwiseSink ??= {}) as SinkState;

/** Starts the in-app sink once per process when no real relay is configured. */
export function ensureSmtpSink(port = smtpSinkPort()) {
  if (process.env.SMTP_HOST) return undefined;
  if (!state.started) {
    state.started = startSmtpSink({ port, store: storeCapturedMail });
    state.started.then(
      (s) =>
        console.log(`[steerwise] mail sink listening on 127.0.0.1:${s.port}; read captured mail on the Outbox page`),
      (err: Error) => {
        console.error(`[steerwise] could not start the mail sink on port ${port}: ${err.message}`);
        state.started = undefined;
      },
    );
  }
  return state.started;
}
