// Email channel against a real SMTP sink (smtp-server on a free 127.0.0.1 port): login with the
// password from the environment, subject and body of the alert, and a refused login recorded as failed.
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { afterEach, describe, expect, it } from 'vitest';
import { alertsSection } from '../../../../src/config/sections/alerts.js';
import {
  createAlertDispatcher,
  createChannels,
  createMemoryAlertState,
  createMemoryRecorder,
} from '../../../../src/output/alerts/index.js';
import { flag, memoryLogger } from './alert-fixtures.js';

const PASSWORD = 'sink-password-for-tests';

interface Mail {
  from: string;
  to: string[];
  data: string;
  user: string | undefined;
}

let sink: SMTPServer | undefined;

async function startSink(): Promise<{ port: number; mails: Mail[] }> {
  const mails: Mail[] = [];
  sink = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    allowInsecureAuth: true,
    authMethods: ['PLAIN', 'LOGIN'],
    onAuth(auth, _session, callback) {
      if (auth.username === 'qc-bot' && auth.password === PASSWORD) callback(null, { user: auth.username });
      else callback(new Error('Invalid username or password'));
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        mails.push({
          from: session.envelope.mailFrom === false ? '' : session.envelope.mailFrom.address,
          to: session.envelope.rcptTo.map((r) => r.address),
          // Unfold header lines (RFC 5322 §2.2.3) and quoted-printable soft breaks (RFC 2045 §6.7).
          data: Buffer.concat(chunks)
            .toString('utf8')
            .replace(/\r\n[ \t]+/g, ' ')
            .replace(/=\r\n/g, ''),
          user: typeof session.user === 'string' ? session.user : undefined,
        });
        callback();
      });
    },
  });
  await new Promise<void>((resolve) => sink?.listen(0, '127.0.0.1', () => resolve()));
  const address = (sink as unknown as { server: { address(): AddressInfo } }).server.address();
  return { port: address.port, mails };
}

afterEach(async () => {
  await new Promise<void>((resolve) => (sink === undefined ? resolve() : sink.close(() => resolve())));
  sink = undefined;
});

function dispatcherFor(port: number, env: Record<string, string>, allowPlainText = true) {
  const alerts = alertsSection.parse({
    channels: [
      {
        id: 'lab-mail',
        type: 'email',
        host: '127.0.0.1',
        port,
        from: 'driftlight@lab.example',
        to: ['qc@lab.example'],
        username: 'qc-bot',
        passwordEnv: 'DL_TEST_SMTP_PASSWORD',
        attempts: 2,
        backoffMs: 10,
        timeoutMs: 5000,
        allowPlainText,
      },
    ],
    routing: { info: [], warning: ['lab-mail'], critical: ['lab-mail'] },
  });
  const logger = memoryLogger();
  const recorder = createMemoryRecorder();
  const channels = createChannels(alerts, { env, logger });
  const dispatcher = createAlertDispatcher({ alerts, channels, state: createMemoryAlertState(), recorder, logger });
  return { dispatcher, recorder, logger, channels };
}

describe('email channel (real SMTP sink)', () => {
  it('refuses to send over a server without TLS unless the config allows plain text, and records why (issue 16.6)', async () => {
    const { port, mails } = await startSink(); // this sink offers no STARTTLS
    const { dispatcher, recorder, channels, logger } = dispatcherFor(port, { DL_TEST_SMTP_PASSWORD: PASSWORD }, false);
    dispatcher.dispatch([flag('yield-westgard', 'critical')]);
    await dispatcher.idle();
    for (const channel of channels.values()) channel.close?.();
    expect(mails).toHaveLength(0);
    expect(recorder.records[0]).toMatchObject({ status: 'failed', channelId: 'lab-mail' });
    expect(recorder.records[0]?.error).toMatch(/STARTTLS|TLS/i);
    expect(logger.lines.some((line) => line.level === 'error' && line.message.includes('stays in the outbox'))).toBe(
      true,
    );
    expect(() =>
      alertsSection.parse({
        channels: [{ id: 'm', type: 'email', host: 'h', from: 'a@b.c', to: ['d@e.f'], requireTls: false }],
        routing: { info: [], warning: ['m'], critical: ['m'] },
      }),
    ).toThrow(/allowPlainText: true/);
  });

  it('logs in with the password from the environment and sends subject and body', async () => {
    const { port, mails } = await startSink();
    const { dispatcher, recorder, channels } = dispatcherFor(port, { DL_TEST_SMTP_PASSWORD: PASSWORD });
    dispatcher.dispatch([flag('yield-westgard', 'critical')]);
    await dispatcher.idle();
    for (const channel of channels.values()) channel.close?.();
    expect(recorder.records[0]).toMatchObject({ status: 'delivered', channelId: 'lab-mail' });
    expect(mails).toHaveLength(1);
    expect(mails[0]?.user).toBe('qc-bot');
    expect(mails[0]?.to).toEqual(['qc@lab.example']);
    expect(mails[0]?.data).toContain(
      'Subject: [driftlight CRITICAL] fluorescein-daily controlQuantumYield: yield-westgard 1-3s',
    );
    expect(mails[0]?.data).toContain('control yield 0.891 is 3.4 SD below target 0.925 (1-3s).');
    expect(mails[0]?.data).not.toContain(PASSWORD);
  });

  it('a refused login is retried, recorded as failed, and the password is not logged', async () => {
    const { port, mails } = await startSink();
    const { dispatcher, recorder, logger, channels } = dispatcherFor(port, { DL_TEST_SMTP_PASSWORD: 'wrong-password' });
    dispatcher.dispatch([flag('w', 'warning', '1-2s')]);
    await dispatcher.idle();
    for (const channel of channels.values()) channel.close?.();
    expect(mails).toHaveLength(0);
    expect(recorder.records[0]).toMatchObject({ status: 'failed', attempts: 2 });
    expect(JSON.stringify(logger.lines)).not.toContain('wrong-password');
  });
});
