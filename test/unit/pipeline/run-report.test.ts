// RunReport: the counters of the end-of-run summary and the committed-set listeners.
import { describe, expect, it } from 'vitest';
import { RunReport } from '../../../src/pipeline/run-report.js';

describe('RunReport', () => {
  it('counts files and sets and tells listeners each committed or failed set', () => {
    const report = new RunReport();
    const told: [string, string | undefined][] = [];
    report.onCommitted((setId, path) => told.push([setId, path]));
    report.filesTaken(4, 1);
    report.filesRejectedLater(1);
    report.setDispatched();
    report.setDispatched();
    report.setDone('s1', '/r/s1.json', true);
    report.setFailed('s2');
    report.setNotCommitted();
    expect(report.counts).toEqual({
      filesAccepted: 3,
      filesRejected: 2,
      setsDispatched: 2,
      setsDone: 1,
      setsFailed: 1,
      setsPartial: 1,
      setsNotCommitted: 1,
    });
    expect(told).toEqual([
      ['s1', '/r/s1.json'],
      ['s2', undefined],
    ]);
  });
});
