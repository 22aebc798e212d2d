// The one table of stable error codes: each code's class, and the hint shown to a user.
// Add a code by adding a row; codes are part of the public interface and never change meaning.

export const ERROR_CODES = {
  // Input files (class InputRejected: never retried, the file goes to quarantine)
  EMPTY_FILE: { kind: 'input', hint: 'The file has no content; check that the export finished writing.' },
  BINARY_CONTENT: {
    kind: 'input',
    hint: 'The file holds binary bytes; export as text (CSV, TSV, JCAMP-DX or driftlight JSON).',
  },
  TRUNCATED: { kind: 'input', hint: 'The file ends early; re-export it or wait for the instrument to finish writing.' },
  NON_NUMERIC: { kind: 'input', hint: 'A numeric column holds text; check the decimal mark and the column separator.' },
  NON_FINITE: {
    kind: 'input',
    hint: 'Values must be finite numbers; remove NaN or Infinity (often detector overflow).',
  },
  NEGATIVE_COUNTS: {
    kind: 'input',
    hint: 'Photon counts cannot be negative; export raw counts, not background-subtracted data.',
  },
  AXIS_NOT_ASCENDING: {
    kind: 'input',
    hint: 'The axis must be monotonic (ascending or descending) without reversals.',
  },
  AXIS_DUPLICATE: { kind: 'input', hint: 'The axis repeats a value; remove duplicated rows.' },
  AXIS_NOT_UNIFORM: { kind: 'input', hint: 'A decay histogram needs equally spaced time channels.' },
  LENGTH_MISMATCH: { kind: 'input', hint: 'All columns must have the same number of rows.' },
  UNKNOWN_UNIT: {
    kind: 'input',
    hint: 'Name the axis unit in the column header, e.g. "wavelength (nm)" or "time (ns)".',
  },
  FILE_TOO_LARGE: { kind: 'input', hint: 'Raise limits.maxFileBytes in the config if such large files are expected.' },
  UNKNOWN_LAYOUT: {
    kind: 'input',
    hint: 'The layout was not recognised; see README "Input formats" for what is read.',
  },
  NO_DATA: { kind: 'input', hint: 'No numeric data rows were found after the header.' },
  TOO_FEW_POINTS: { kind: 'input', hint: 'There are too few data points for this kind of measurement.' },
  MISSING_COLUMN: {
    kind: 'input',
    hint: 'A required column is absent; name it in the header or choose another column.',
  },
  JCAMP_INVALID: {
    kind: 'input',
    hint: 'The JCAMP-DX file breaks the standard; check the ##XYDATA block and its factors.',
  },
  JSON_INVALID: {
    kind: 'input',
    hint: 'The JSON does not match the driftlight data schema (schemas/data.schema.json).',
  },
  METADATA_INVALID: { kind: 'input', hint: 'A metadata value could not be read; check its number format and unit.' },
  DATE_AMBIGUOUS: {
    kind: 'input',
    hint: "State the instrument's date order and time zone in the config (instrument.dateOrder: DMY, MDY or YMD; instrument.timeZone), or export ISO 8601 dates.",
  },
  DATE_INVALID: {
    kind: 'input',
    hint: 'The acquisition time names a date or time that does not exist (31 February, 25:00); fix the instrument clock or export ISO 8601 dates.',
  },
  MATRIX_LAYOUT: {
    kind: 'input',
    hint: 'An excitation–emission matrix is not analysed yet; export one spectrum per excitation wavelength.',
  },
  KIND_CONFLICT: {
    kind: 'input',
    hint: 'The file name and the content name different kinds of measurement; rename the file, fix its header, or declare the kind in a formats profile.',
  },
  EXCITATION_REQUIRED: {
    kind: 'input',
    hint: 'A Raman-shift axis is relative to the excitation line; add "excitation wavelength (nm): 350" to the header or excitationNm to a formats profile.',
  },
  INPUT_INVALID: { kind: 'input', hint: 'The input does not meet the requirements of this analysis; see the message.' },
  AXIS_NOT_COVERED: {
    kind: 'input',
    hint: 'The correction data (blank, detector curve, absorbance) must cover the whole spectrum; trim the spectrum or supply a wider curve.',
  },
  IRF_AXIS_MISMATCH: {
    kind: 'input',
    hint: "Record the IRF with the same or finer channels than the decay, and check both files' time axes (zero and unit): the IRF must fall inside the decay's window.",
  },
  EXCITATION_MISMATCH: {
    kind: 'input',
    hint: 'Measure the blank at the same excitation wavelength as the sample, or widen the tolerance in the options.',
  },
  MANIFEST_INVALID: {
    kind: 'input',
    hint: 'Fix the set manifest (NAME.set.yaml); docs/pipeline.md describes its fields.',
  },
  MANIFEST_NO_FILES: {
    kind: 'input',
    hint: "None of the manifest's files could be used: put the listed files (plain names) in the manifest's folder, replace the rejected ones (see their NAME.error.json), then drop the manifest in again.",
  },
  DUPLICATE_INPUT: {
    kind: 'input',
    hint: 'This content was already processed; run `driftlight reprocess` to analyse it again.',
  },
  INPUT_MISSING: {
    kind: 'input',
    hint: 'An input of the set was moved or deleted before it was analysed; put it back in the inbox under a new name, or re-export it.',
  },
  SYMLINK_REFUSED: {
    kind: 'input',
    hint: 'driftlight does not follow symbolic links (they may point outside the inbox); copy the file itself into the inbox, or set watch.symlinks: inside-inbox for links that resolve inside it.',
  },
  SET_FAILED: {
    kind: 'input',
    hint: 'The measurement set could not be analysed; see the message, fix the inputs and drop them in again.',
  },
  // Configuration (class ConfigInvalid: fix the config, then restart)
  ALREADY_RUNNING: {
    kind: 'config',
    hint: 'Another driftlight instance holds the state folder; stop it, or give this one its own folders.state.',
  },
  FOLDER_MISSING: {
    kind: 'config',
    hint: 'The folder does not exist (an unmounted share?); mount or create it, or fix folders.* in the config.',
  },
  CONFIG_INVALID: { kind: 'config', hint: 'Fix the named config path; `driftlight config check` validates a file.' },
  // Transient (class Transient: retried with backoff)
  TRANSIENT: { kind: 'transient', hint: 'A temporary failure; it will be retried automatically.' },
  JOB_TIMEOUT: {
    kind: 'transient',
    hint: 'The job ran longer than queue.jobTimeoutMs; raise it if such long fits are expected.',
  },
  WORKER_LOST: {
    kind: 'transient',
    hint: 'The thread or process running the job died or stalled; the job is retried elsewhere.',
  },
  QUEUE_UNAVAILABLE: {
    kind: 'transient',
    hint: 'The queue cannot reach Redis; check queue.redisUrl and that Redis is running.',
  },
  // Analysis could not produce a trustworthy result (class AnalysisFailed: not retried)
  FIT_FAILED: {
    kind: 'analysis',
    hint: 'The fit did not converge; check the fit range, the IRF and the number of components.',
  },
  OUT_OF_RANGE: { kind: 'analysis', hint: 'A value is outside the range where the method is valid; see the message.' },
  // Internal (a bug: please report with the input file)
  INTERNAL: { kind: 'internal', hint: 'This is a driftlight bug; report it with the input file.' },
  QUEUE_CLOSED: { kind: 'internal', hint: 'The job queue was closed; enqueue before close() (a bug in the caller).' },
} as const;

export type ErrorCode = keyof typeof ERROR_CODES;
export type ErrorKind = (typeof ERROR_CODES)[ErrorCode]['kind'];
