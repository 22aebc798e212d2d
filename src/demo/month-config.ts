// The demo month's workspace files (invented lab): driftlight.yaml (folders, the reference and the
// daily control, a 2 h IRF validity, the instrument profile of the lab's TCSPC script, webhook
// alerts) and the rule set, as text.

/** The workspace config: folders, the reference and control, a 2 h IRF validity, webhook alerts. */
export function monthConfig(
  lab: string,
  control: { readonly quantumYield: number; readonly tauNs: number },
  channelWidthNs: number,
): string {
  return [
    `# driftlight config of the demo month (${lab}).`,
    'folders: { inbox: inbox, archive: archive, quarantine: quarantine, results: results, outbox: outbox, state: state }',
    'references:',
    '  - { id: r6g, sampleIdPattern: "^REF-R6G", standardId: rhodamine-6g-ethanol }',
    'controls:',
    `  - { id: ql-daily, label: daily QL-540 control, sampleIdPattern: "^CTRL-QL-", targetYield: ${control.quantumYield}, sdYield: 0.02, targetTauNs: ${control.tauNs}, sdTauNs: 0.05, baselineRuns: 5 }`,
    'rules: { file: rules.yaml }',
    'assembly:',
    '  requiredParts: [emission, absorbance, decay, irf]',
    '  setTimeoutMs: 7200000',
    '  pairingWindowHours: { blank: 24, reference: 192 }',
    '  # The reference is measured weekly, not every session: nothing to wait for.',
    '  referenceSessionHours: 0',
    'instrument: { irfValidityHours: 2 }',
    "# The lab's TCSPC script writes channel, counts and IRF without column names: an instrument profile says so.",
    'formats:',
    '  profiles:',
    `    - { name: tcspc-script, match: "*_tcspc.txt", delimiter: tab, columnNamesLine: 0, axisColumn: 1, axisUnit: channel, valueColumns: [2], irfColumn: 3, channelWidthNs: ${channelWidthNs}, kind: decay }`,
    'watch: { stabilityWindowMs: 40, pollIntervalMs: 20 }',
    'alerts:',
    '  channels:',
    '    - { id: log, type: log }',
    '    - { id: lab-webhook, type: webhook, url: "{{WEBHOOK_URL}}", attempts: 2, backoffMs: 50 }',
    '  routing: { info: [log], warning: [log, lab-webhook], critical: [log, lab-webhook] }',
    '  cooldownMinutes: 240',
    'logging: { level: info, stdout: off }',
    '',
  ].join('\n');
}

/** The rule set of the demo: rules/default.yaml's rules without 10-x on the yield (see the comment in the file); the control itself is defined once, in the config. */
export function monthRules(lab: string): string {
  return [
    `# QC rules of the demo month (${lab}): the rules of rules/default.yaml, judging every control`,
    '# defined in driftlight.yaml, with one change (10-x left out on the yield, below).',
    'version: 1',
    'name: demo month rules',
    'timeZone: UTC',
    'rules:',
    '  # 10-x is left out on the yield: every control of a week is computed against the same weekly reference',
    '  # measurement, so consecutive yields share its error and are not independent runs, which 10-x assumes.',
    '  - { id: yield-westgard, metric: controlQuantumYield, kind: westgard, severity: critical, warningSeverity: warning, rangeScope: consecutive, warningGate: false, checks: [1-2s, 1-3s, 2-2s, R-4s, 4-1s] }',
    '  - { id: yield-ewma, metric: controlQuantumYield, kind: ewma, severity: warning, lambda: 0.2, limitWidth: 2.962 }',
    '  - { id: yield-cusum, metric: controlQuantumYield, kind: cusum, severity: critical, referenceSd: 0.5, decisionSd: 5 }',
    '  - { id: lifetime-westgard, metric: meanLifetimeNs, kind: westgard, severity: critical, checks: [1-3s, 2-2s, 4-1s, 10-x] }',
    '  - { id: intensity-change, metric: intensityPerAbsorbedLight, kind: percent-change, severity: warning, maxPercent: 10, windowRuns: 7, minRuns: 3 }',
    '  - { id: peak-shift, metric: peakWavelengthNm, kind: percent-change, severity: warning, maxPercent: 0.5, windowRuns: 7, minRuns: 3 }',
    '  - { id: control-absorbance, metric: absorbanceAtExcitation, kind: tolerance, severity: warning, max: 0.1 }',
    '  - { id: control-missing, metric: controlQuantumYield, kind: control-missing, severity: warning, dueBy: "10:00", days: [mon, tue, wed, thu, fri, sat, sun] }',
    '  - { id: raman-snr, metric: ramanSnr, scope: instrument, kind: instrument-health, severity: warning, below: 300 }',
    '  - { id: raman-peak, metric: ramanPeakErrorNm, scope: instrument, kind: instrument-health, severity: warning, above: 1, below: -1 }',
    '  - { id: irf-width, metric: irfWidthNs, scope: instrument, kind: instrument-health, severity: warning, above: 0.3 }',
    '  - { id: fit-quality, metric: fitChi2Reduced, scope: instrument, kind: instrument-health, severity: warning, above: 1.3, consecutiveRuns: 3 }',
    '',
  ].join('\n');
}
