/**
 * Shared setup of the hand-off and review API tests: a real SMTP sink writing
 * the outbox table, and the engineer's array (revision 1), CSV dataset and
 * finished estimate run built by tests/lib/handoff/fixtures.ts.
 */
import { startSmtpSink } from '@/lib/mail/sink';
import { storeCapturedMail } from '@/lib/mail/outbox';
import type { DoaMethod } from '@/lib/doa';
import { userOf } from '../helpers/api';
import { createArray, createDataset, createRun } from '../lib/handoff/fixtures';

export async function startSinkWithRun({
  methods,
  datasetOnArray = false,
}: {
  methods: DoaMethod[];
  datasetOnArray?: boolean;
}) {
  const sink = await startSmtpSink({ port: 0, store: storeCapturedMail });
  process.env.SMTP_SINK_PORT = String(sink.port);
  const engineer = await userOf('engineer');
  const { array, revision, spacingWavelengths } = await createArray({ user: engineer });
  const { dataset } = await createDataset({
    user: engineer,
    elements: 8,
    spacingWavelengths,
    ...(datasetOnArray ? { arrayId: array.id } : {}),
  });
  const { run } = await createRun({ user: engineer, revision, dataset, spacingWavelengths, methods });
  return { sink, arrayId: array.id, runId: run.id };
}
