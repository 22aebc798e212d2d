// Dispatcher: routing by severity, merging checks of one rule, cooldown, escalation, recovery
// notices, retries with exponential backoff, recorded failures, and never blocking the caller.
import { describe, expect, it } from 'vitest';
import { alertsSection } from '../../../../src/config/sections/alerts.js';
import {
  createAlertDispatcher,
  createMemoryAlertState,
  createMemoryRecorder,
  type AlertChannel,
  type AlertMessage,
} from '../../../../src/output/alerts/index.js';
import { flag, memoryLogger, recovery } from './alert-fixtures.js';

/** A channel that records messages and fails its first `failures` sends. */
function fakeChannel(id: string, failures = 0): AlertChannel & { received: AlertMessage[]; calls: number } {
  const channel = {
    id,
    type: 'fake',
    received: [] as AlertMessage[],
    calls: 0,
    send(message: AlertMessage): Promise<void> {
      channel.calls++;
      if (channel.calls <= failures) return Promise.reject(new Error(`refused ${channel.calls}`));
      channel.received.push(message);
      return Promise.resolve();
    },
  };
  return channel;
}

const alerts = alertsSection.parse({
  channels: [
    { id: 'log', type: 'log', attempts: 1 },
    { id: 'pager', type: 'log', attempts: 3, backoffMs: 100 },
  ],
  routing: { info: ['log'], warning: ['log'], critical: ['log', 'pager'] },
  cooldownMinutes: 60,
});

function setup(options: { pagerFailures?: number } = {}) {
  let clockMs = Date.UTC(2026, 2, 2, 8);
  const log = fakeChannel('log');
  const pager = fakeChannel('pager', options.pagerFailures ?? 0);
  const waits: number[] = [];
  const recorder = createMemoryRecorder();
  const logger = memoryLogger();
  const dispatcher = createAlertDispatcher({
    alerts,
    channels: new Map<string, AlertChannel>([
      ['log', log],
      ['pager', pager],
    ]),
    state: createMemoryAlertState(),
    recorder,
    logger,
    nowMs: () => clockMs,
    sleep: (ms) => {
      waits.push(ms);
      return Promise.resolve();
    },
  });
  const advanceMinutes = (minutes: number): void => {
    clockMs += minutes * 60_000;
  };
  return { dispatcher, log, pager, waits, recorder, logger, advanceMinutes };
}

describe('alert dispatcher', () => {
  it('routes by severity', async () => {
    const { dispatcher, log, pager } = setup();
    dispatcher.dispatch([flag('a', 'warning', '1-2s'), flag('b', 'critical')]);
    await dispatcher.idle();
    expect(log.received.map((m) => m.ruleId).sort()).toEqual(['a', 'b']);
    expect(pager.received.map((m) => m.ruleId)).toEqual(['b']);
  });

  it('merges checks of one rule + control + metric into one message', async () => {
    const { dispatcher, log } = setup();
    dispatcher.dispatch([flag('w', 'critical', '2-2s'), flag('w', 'critical', '4-1s')]);
    await dispatcher.idle();
    expect(log.received).toHaveLength(1);
    expect(log.received[0]?.checks).toEqual(['2-2s', '4-1s']);
  });

  it('does not re-send the same rule + control + metric within cooldownMinutes, but does after', async () => {
    const { dispatcher, log, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'warning')]);
    advanceMinutes(59);
    expect(dispatcher.dispatch([flag('w', 'warning')])).toEqual([]);
    advanceMinutes(2);
    expect(dispatcher.dispatch([flag('w', 'warning')])).toHaveLength(1);
    await dispatcher.idle();
    expect(log.received).toHaveLength(2);
  });

  it('an escalation (warning → critical) is sent inside the cooldown', () => {
    const { dispatcher, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'warning')]);
    advanceMinutes(5);
    expect(dispatcher.dispatch([flag('w', 'critical')]).map((m) => m.severity)).toEqual(['critical']);
  });

  it('sends a recovery notice to the channels that got the alert, then re-arms the key', async () => {
    const { dispatcher, log, pager, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'critical')]);
    advanceMinutes(10);
    dispatcher.dispatch([], [recovery('w'), recovery('never-alerted')]);
    await dispatcher.idle();
    expect(pager.received.map((m) => m.type)).toEqual(['flag', 'recovery']);
    expect(log.received.map((m) => m.type)).toEqual(['flag', 'recovery']);
    advanceMinutes(1);
    expect(dispatcher.dispatch([flag('w', 'critical')])).toHaveLength(1);
  });

  it('retries with exponential backoff and records the outcome', async () => {
    const { dispatcher, pager, waits, recorder } = setup({ pagerFailures: 2 });
    dispatcher.dispatch([flag('w', 'critical')]);
    await dispatcher.idle();
    expect(pager.calls).toBe(3);
    expect(waits).toEqual([100, 200]);
    expect(recorder.records.find((r) => r.channelId === 'pager')).toMatchObject({ status: 'delivered', attempts: 3 });
  });

  it('records and logs a delivery that fails every attempt', async () => {
    const { dispatcher, recorder, logger } = setup({ pagerFailures: 99 });
    dispatcher.dispatch([flag('w', 'critical')]);
    await dispatcher.idle();
    expect(recorder.records.find((r) => r.channelId === 'pager')).toMatchObject({
      status: 'failed',
      attempts: 3,
      error: 'refused 3',
    });
    expect(logger.lines.some((line) => line.level === 'error' && line.message.includes('pager'))).toBe(true);
  });

  it('a channel that never answers does not delay dispatch', async () => {
    const hanging: AlertChannel = { id: 'log', type: 'hang', send: () => new Promise<void>(() => undefined) };
    const recorder = createMemoryRecorder();
    const dispatcher = createAlertDispatcher({
      alerts: alertsSection.parse({ channels: [{ id: 'log', type: 'log', attempts: 1, timeoutMs: 150 }] }),
      channels: new Map([['log', hanging]]),
      state: createMemoryAlertState(),
      recorder,
      logger: memoryLogger(),
    });
    const started = performance.now();
    dispatcher.dispatch([flag('w', 'critical')]);
    expect(performance.now() - started).toBeLessThan(50);
    await dispatcher.idle();
    expect(recorder.records[0]).toMatchObject({ status: 'failed', error: 'timed out after 150 ms' });
  });
});
