// The analysis result of one measurement set: plain JSON (no typed arrays), versioned by `schema`.
// Written to results/YYYY-MM-DD/<setId>.json and described by schemas/result.schema.json.
// QC stages add `qc.flags`; everything else is filled by analyze().
import type { MeasurementRole } from '../model/spectrum.js';

export const RESULT_SCHEMA = 'driftlight.result/1' as const;

/** What a set was measured for (the role of its primary measurement). */
export type SetRole = MeasurementRole;

/** A part a set may need: the data it carries, independent of which file supplied it. */
export const SET_PARTS = [
  'emission',
  'excitation',
  'absorbance',
  'decay',
  'irf',
  'blank',
  'reference-emission',
  'reference-absorbance',
  'detector-curve',
  'raman',
] as const;
export type SetPart = (typeof SET_PARTS)[number];

/** One input file of a set, as recorded in provenance. */
export interface ResultInput {
  /** File name (not the full path: folders differ between machines). */
  readonly file: string;
  /** sha256 (hex) of the file's bytes. */
  readonly sha256: string;
  /** The part this file supplied. */
  readonly part: SetPart;
  /** Role of the file in the lab workflow. */
  readonly role: MeasurementRole;
  /** 'own' = arrived with the set; 'paired' = the most recent valid one, borrowed from another set; 'config' = named in the config (detector curve). */
  readonly origin: 'own' | 'paired' | 'config';
  /** For paired inputs: the set the file belonged to. */
  readonly pairedFromSetId?: string;
}

/** A correction as applied, in order (mirrors the spectra module's CorrectionRecord). */
export interface AppliedCorrection {
  readonly name: string;
  /** Which spectrum the correction was applied to ('emission' or 'reference-emission'). */
  readonly target: 'emission' | 'reference-emission';
  readonly inputs: Readonly<Record<string, string>>;
  readonly parameters: Readonly<Record<string, number | string | boolean>>;
  readonly warnings: readonly string[];
}

/** Key numbers of the corrected emission spectrum. */
export interface EmissionMetrics {
  /** Wavelength of the maximum in nm. */
  readonly peakWavelengthNm: number;
  /** Value at the maximum (unit of the spectrum). */
  readonly peakValue: number;
  /** Integrated intensity over the whole wavelength range (value unit × nm); Φ uses quantumYield.inputs.sampleIntegral, over its windowNm. */
  readonly integratedIntensity: number;
  /** Full width at half maximum in nm, when it could be determined. */
  readonly fwhmNm?: number;
  readonly valueUnit: string;
  /** Wavelength range used in nm. */
  readonly rangeNm: readonly [number, number];
}

/** Absorbance facts used by the yield and inner-filter corrections. */
export interface AbsorbanceSummary {
  /** Absorbance at the excitation wavelength (base-10, path length of the measurement). */
  readonly absorbanceAtExcitation: number;
  readonly excitationNm: number;
  /** Wavelength of the absorbance maximum in nm. */
  readonly peakWavelengthNm: number;
  readonly peakAbsorbance: number;
}

/** One fitted exponential component. */
export interface DecayComponentSummary {
  readonly tauNs: number;
  /** Standard error of τ in ns (inverse Fisher information plus the IRF's counting noise when propagated; decayFit.errorNotes says how it was formed). */
  readonly tauNsStdErr?: number;
  /** The part of tauNsStdErr, in ns, due to the IRF's counting noise (added in quadrature); absent when not propagated (errorNotes says why). */
  readonly tauNsStdErrFromIrf?: number;
  readonly amplitude: number;
  readonly amplitudeFraction: number;
  readonly intensityFraction: number;
}

/** The lifetime fit in short. */
export interface DecayFitSummary {
  readonly components: readonly DecayComponentSummary[];
  /** Intensity-weighted mean lifetime in ns (the τ used for rate constants). */
  readonly tauMeanIntensityNs: number;
  /** Amplitude-weighted mean lifetime Σaτ/Σa in ns. Always written by analyze(). */
  readonly tauMeanAmplitudeNs?: number;
  /** Fitted IRF shift in ns (the IRF moved later). Always written by analyze(). */
  readonly shiftNs?: number;
  /** Fitted constant background in counts per channel. Always written by analyze(). */
  readonly backgroundPerChannel?: number;
  /** Fit range in ns: start times of the first and of the last fitted channel. Always written by analyze(). */
  readonly rangeNs?: readonly [number, number];
  /** Channels in the range minus free parameters: the divisor of chi2Reduced. Always written by analyze(). */
  readonly degreesOfFreedom?: number;
  /** Pearson χ² Σ(n − m)²/m over the range, divided by degreesOfFreedom. */
  readonly chi2Reduced: number;
  readonly converged: boolean;
  /** False when the fit is not believable (a parameter at a bound, τ outside the resolvable range, cancelling amplitudes): QC and rates skip it. Always written by analyze(). */
  readonly acceptable?: boolean;
  /** Why the fit is not acceptable; empty when it is. Always written by analyze(). */
  readonly unacceptableReasons?: readonly string[];
  /** True when the Coates pile-up correction was applied before fitting (config analysis.pileUpCorrection). */
  readonly pileUpCorrected?: boolean;
  /** Repetition rate in Hz the fit used (file, else config instrument.repetitionRateMHz); absent when unknown. */
  readonly repetitionRateHz?: number;
  readonly estimator: string;
  /** Total counts in the decay histogram. */
  readonly totalCounts: number;
  /** Where the IRF came from: a column of the decay file, a separate file, or none (tail fit). */
  readonly irfSource: 'decay-column' | 'irf-file' | 'none';
  /** Full width at half maximum of the IRF used, in ns (interpolated half-maximum crossings); absent without an IRF. QC metric irfWidthNs. */
  readonly irfFwhmNs?: number;
  /** How the standard errors were formed: parameters at a bound counted as free, IRF noise propagated or why not (issue 17.3). Always written by analyze(). */
  readonly errorNotes?: readonly string[];
  readonly warnings: readonly string[];
}

/** One entry of the quantum-yield uncertainty budget. */
export interface UncertaintyBudgetEntry {
  readonly source: string;
  /** Relative standard uncertainty contributed (dimensionless, e.g. 0.02 = 2 %). */
  readonly relativeUncertainty: number;
  /** Standard uncertainty of the input itself (unit of the input); always written by analyze(). */
  readonly inputStandardUncertainty?: number;
  /** Where it came from: 'stated in …', 'estimated from noise: …' or 'assumed: …'; always written by analyze(). */
  readonly basis?: string;
}

/** The numbers Φ was computed from, so that anyone can recompute it (Brouwer, Pure Appl. Chem. 83, 2213 (2011)). */
export interface QuantumYieldInputs {
  /** ∫F dλ of the corrected sample emission over windowNm (value unit × nm). */
  readonly sampleIntegral: number;
  readonly referenceIntegral: number;
  /** Absorbances (base-10, 1 cm) at the excitation wavelengths. */
  readonly sampleAbsorbance: number;
  readonly referenceAbsorbance: number;
  readonly sampleRefractiveIndex: number;
  readonly referenceRefractiveIndex: number;
  readonly referenceYield: number;
  /** 'absorptance': f = 1 − 10^(−A) (spectra not corrected for inner filter); 'absorbance': f = A (inner filter already corrected in both). */
  readonly lightAbsorbed: 'absorptance' | 'absorbance';
  /** Integration window in nm, the same for both spectra. */
  readonly windowNm: readonly [number, number];
  /** Corrections applied to each spectrum before integration, in order. */
  readonly sampleCorrections: readonly string[];
  readonly referenceCorrections: readonly string[];
}

/** The relative quantum yield against a reference standard. */
export interface QuantumYieldSummary {
  readonly value: number;
  readonly standardUncertainty: number;
  readonly budget: readonly UncertaintyBudgetEntry[];
  readonly standardId: string;
  /** Set whose reference measurement was used. */
  readonly referenceSetId?: string;
  /** Always written by analyze() (optional only for results stored before it was added). */
  readonly inputs?: QuantumYieldInputs;
  /** Reasons to look twice: 'above-one-within-uncertainty', 'band-not-at-baseline'. Always written by analyze(). */
  readonly flags?: readonly string[];
  readonly warnings: readonly string[];
}

/** Excited-state rate constants from Φ and τ (Birks 1976). */
export interface RateConstantsSummary {
  readonly krPerS: number;
  readonly knrPerS: number;
  readonly tau0Ns: number;
  readonly totalDecayRatePerS: number;
  /** The Φ the rates used (quantumYield.value, or 1 when Φ is above 1 within its uncertainty). Always written by analyze(). */
  readonly quantumYield?: number;
  /** The τ the rates used, in ns. Always written by analyze(). */
  readonly tauNs?: number;
  /** Which τ that is: the fit's intensity-weighted mean Σaτ²/Σaτ. Always written by analyze(). */
  readonly tauBasis?: 'intensity-weighted mean';
}

/** Water-Raman sensitivity test (raman sets). */
export interface RamanSummary {
  readonly peakWavelengthNm: number;
  readonly signalToNoise: number;
  readonly passed?: boolean;
}

/** A QC flag added by a result stage. */
/** An earlier QC verdict of a run, kept when a result inserted before it in acquisition order re-judged it. */
export interface QcVerdictHistoryEntry {
  /** The flags the run had until then. */
  readonly flags: readonly QcFlag[];
  /** When they were replaced (ISO 8601 UTC, the coordinator's clock). */
  readonly replacedAt: string;
  /** Which result re-judged the run. */
  readonly reason: string;
}

export interface QcFlag {
  /** Stable rule id, e.g. 'westgard-1-3s'. */
  readonly rule: string;
  readonly severity: 'info' | 'warning' | 'critical';
  readonly message: string;
  readonly quantity?: string;
  readonly value?: number;
}

/**
 * Whether QC judged this result, for which control (or the instrument scope), and which measurement of
 * a file holding several (issue 18.3): a control judges one measurement of its files, the column its
 * config names (`controls[].measurement`) or, by default, the file's first; the others are not judged.
 */
export interface QcJudgement {
  /** The control id (`controls[].id`) or 'instrument' (water Raman, IRF checks) whose series this result belongs to. */
  readonly control: string;
  /** true: the result's metrics are a run of that control's series, judged by the rules (qc.flags); false: not judged, `reason` says why. */
  readonly judged: boolean;
  /** The column of this result when its file holds several measurements (result.measurement.column). */
  readonly measurement?: string;
  /** Which measurement of a file the control judges: 'config' (the column named by controls[].measurement) or 'first' (the file's first measurement, the default). */
  readonly selectedBy: 'config' | 'first';
  /** The column the control judges, when its config names one. */
  readonly judgedMeasurement?: string;
  /** The metrics judged (judged: true). */
  readonly metrics?: readonly string[];
  /** Why the result was not judged (judged: false), in one sentence. */
  readonly reason?: string;
}

/** A part that could not be computed or was missing, and why. */
export interface MissingItem {
  /** The missing part ('irf') or the quantity that could not be computed ('quantumYield'). */
  readonly what: string;
  readonly reason: string;
}

/** Why a set was analysed again, and what the newer result supersedes. */
export interface Reanalysis {
  /** reference-arrived: a reference standard measured in the set's session (assembly.referenceSessionHours) arrived after the set was analysed without it. */
  readonly reason: 'reference-arrived';
  /** The reference set now paired. */
  readonly referenceSetId: string;
  /** The result superseded: when it was analysed, the sha256 of its file, the reference it used (none: absent) and its yield. */
  readonly supersedes: {
    readonly analyzedAt: string;
    readonly resultSha256: string;
    readonly referenceSetId?: string;
    readonly quantumYield?: number;
  };
}

export interface ResultProvenance {
  readonly inputs: readonly ResultInput[];
  /** sha256 (hex) of the canonical JSON of the analysis settings used. */
  readonly configHash: string;
  readonly softwareVersion: string;
  /** Names of the corrections applied, in order. */
  readonly corrections: readonly string[];
  /** When the analysis ran (ISO 8601, UTC), supplied by the coordinator. */
  readonly analyzedAt: string;
  /** Where acquiredAt came from: the files' own acquisition time ('metadata') or, when they carried none, the file's modification time ('file-modified'). */
  readonly acquiredAtSource?: 'metadata' | 'file-modified';
  /** Present when this result supersedes an earlier one of the same set (see Reanalysis). */
  readonly reanalysis?: Reanalysis;
  /** Earlier versions of inputs that changed at their path after they were read (a writer that paused, a file rewritten in place), which this result supersedes; absent when there were none. */
  readonly supersededInputs?: readonly SupersededInput[];
}

/** One earlier version of an input, replaced by the version this result was computed from. */
export interface SupersededInput {
  readonly file: string;
  /** sha256 (hex) of that version's bytes. */
  readonly sha256: string;
  readonly sizeBytes: number;
  /** When that version was replaced by the next (ISO 8601, UTC). */
  readonly replacedAt: string;
  /** sha256 of the result file the set had from that version, when one had been written. */
  readonly resultSha256?: string;
  /** Why it was replaced, in one sentence. */
  readonly reason: string;
}

/** Which of several measurements in one file a result analyses. */
export interface ResultMeasurement {
  /** The reader's id of the measurement: the file name with "#column". */
  readonly id: string;
  /** The column read as the values (spectrum) or counts (decay). */
  readonly column: string;
  /** The set part the file supplied. */
  readonly part: SetPart;
  /** 0-based position among the file's measurements, and how many it holds. */
  readonly index: number;
  readonly of: number;
  /** For a further measurement (index ≥ 1): the set it belongs to; its own setId is `setId.column`. */
  readonly setId?: string;
}

export interface AnalysisResult {
  readonly schema: typeof RESULT_SCHEMA;
  readonly setId: string;
  readonly role: SetRole;
  readonly sampleId: string;
  /** When the set was measured: canonical UTC ISO 8601 read by src/model/acquisition-time.ts (provenance.acquiredAtSource says from what). */
  readonly acquiredAt?: string;
  readonly solvent?: string;
  readonly excitationNm?: number;
  /** Present when the result's decay or spectrum is one of several measurements in its file (issue 18.3). */
  readonly measurement?: ResultMeasurement;
  /** true when a required part was missing or a step could not run. */
  readonly partial: boolean;
  readonly missing: readonly MissingItem[];
  readonly spectra: {
    readonly emission?: EmissionMetrics;
    readonly absorbance?: AbsorbanceSummary;
    readonly referenceEmission?: EmissionMetrics;
    readonly referenceAbsorbance?: AbsorbanceSummary;
  };
  readonly corrections: readonly AppliedCorrection[];
  readonly decayFit?: DecayFitSummary;
  readonly quantumYield?: QuantumYieldSummary;
  readonly rates?: RateConstantsSummary;
  readonly raman?: RamanSummary;
  readonly warnings: readonly string[];
  /** The QC verdict on this run as it stands now; `history` keeps the earlier verdicts a later-judged result replaced (issue 16). */
  readonly qc: {
    readonly flags: readonly QcFlag[];
    readonly history?: readonly QcVerdictHistoryEntry[];
    /** Present on results of a control or instrument check: judged or not, which measurement, and why not (issue 18.3). */
    readonly judgement?: QcJudgement;
  };
  readonly provenance: ResultProvenance;
}
