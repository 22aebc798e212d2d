// Issue 16.8: QC verdicts are logged in their own category at info level, one line each, never at
// the warn/error levels that report faults of driftlight itself.
import { describe, expect, it } from 'vitest';
import { logChannelSchema } from '../../../../src/config/sections/alerts.js';
import { messageFromRecovery, messagesFromFlags } from '../../../../src/output/alerts/alert-message.js';
import { createLogChannel } from '../../../../src/output/alerts/log-channel.js';
import { flag, memoryLogger, recovery } from './alert-fixtures.js';

describe('log channel', () => {
  it('writes a critical flag and a recovery as one info line each in category "qc"', async () => {
    const logger = memoryLogger();
    const channel = createLogChannel(logChannelSchema.parse({ id: 'log', type: 'log' }), logger);
    const [critical] = messagesFromFlags(
      [flag('yield-westgard', 'critical'), flag('yield-westgard', 'critical', '2-2s')],
      '2026-03-02T09:00:00.000Z',
    );
    if (critical === undefined) throw new Error('no message');
    await channel.send(critical, new AbortController().signal);
    await channel.send(
      messageFromRecovery(recovery('yield-westgard'), 'critical', '2026-03-03T09:00:00.000Z'),
      new AbortController().signal,
    );
    expect(logger.lines.map((line) => line.level)).toEqual(['info', 'info']);
    expect(logger.lines.map((line) => (line.object as { category?: string }).category)).toEqual(['qc', 'qc']);
    const [flagLine, recoveryLine] = logger.lines;
    expect(flagLine?.message).toBe(
      'QC CRITICAL fluorescein-daily yield-westgard 1-3s, 2-2s: control yield 0.891 is 3.4 SD below target 0.925 (1-3s). control yield 0.891 is 3.4 SD below target 0.925 (2-2s).',
    );
    expect(flagLine?.message).not.toContain('\n');
    expect((flagLine?.object as { qc: { severity: string; setId: string } }).qc).toMatchObject({
      severity: 'critical',
      setId: 'set-1',
    });
    expect(recoveryLine?.message).toMatch(
      /^QC RECOVERED fluorescein-daily yield-westgard: control yield 0\.924 is back in control/,
    );
  });
});
