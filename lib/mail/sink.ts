import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';

export type CapturedMail = { to: string; from: string; subject: string; text: string; html: string | null };

function addresses(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return '';
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ');
}

/**
 * A local SMTP sink: accepts every message on 127.0.0.1 without TLS or auth,
 * parses it with mailparser and hands it to `store`. Used when no SMTP_HOST is
 * configured (development, demo, tests). Never exposed beyond loopback.
 */
export async function startSmtpSink({
  port,
  store,
  host = '127.0.0.1',
}: {
  port: number;
  store: (mail: CapturedMail) => Promise<void>;
  host?: string;
}): Promise<{ port: number; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Steerwise local mail sink',
    size: 10 * 1024 * 1024,
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((parsed) =>
          store({
            to: addresses(parsed.to),
            from: addresses(parsed.from),
            subject: parsed.subject ?? '(no subject)',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
          }),
        )
        .then(() => callback())
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const address = server.server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  return {
    port: actualPort,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
