// The self-contained job payload the coordinator sends to a worker, and what the worker returns.
// Everything analyze() needs travels inside it (file contents, parts, settings, clock), so the same
// payload gives the same result on any backend.
import type { MeasurementRole } from '../model/spectrum.js';
import type { FormatProfile } from '../formats/index.js';
import type { AnalysisResult, Reanalysis, SetPart } from './result.js';

/** One input file, with its content as text. */
export interface PayloadFile {
  readonly name: string;
  readonly sha256: string;
  readonly part: SetPart;
  readonly role: MeasurementRole;
  readonly origin: 'own' | 'paired' | 'config';
  readonly pairedFromSetId?: string;
  readonly content: string;
}

/** The analysis settings snapshot (from the config's analysis, instrument and references sections). */
export interface AnalysisSettings {
  readonly components: 1 | 2 | 3 | 4 | 'auto';
  readonly estimator: 'ml' | 'lsq-neyman' | 'lsq-pearson';
  readonly innerFilter: 'none' | 'centred' | 'geometric';
  /** Warn above this absorbance at excitation (base-10). */
  readonly maxAbsorbanceForYield: number;
  /** Refractive index by solvent name (overrides the built-in table). */
  readonly refractiveIndex: Readonly<Record<string, number>>;
  readonly defaultRefractiveIndex: number;
  readonly cuvette: {
    readonly pathLengthCm: number;
    readonly excitationWindowStartCm: number;
    readonly excitationWindowEndCm: number;
  };
  readonly maxFileBytes: number;
  /** Fit a scatter term (a fraction of the IRF) in lifetime fits (config analysis.scatter); default false. */
  readonly scatter?: boolean;
  /** Instrument profiles (config formats.profiles) the readers apply by file pattern; absent when none are configured. */
  readonly formatProfiles?: readonly FormatProfile[];
  /** Coates pile-up correction before fitting (config analysis.pileUpCorrection); default false. */
  readonly pileUpCorrection?: boolean;
  /** Repetition rate in Hz for decays whose file states none (config instrument.repetitionRateMHz). */
  readonly repetitionRateHz?: number;
  /** What the detector curve holds (config instrument.detectorCurveMeaning); default 'from-header'. */
  readonly detectorCurveMeaning?: 'from-header' | 'multiply' | 'divide';
  /** Integration window and band-edge check of relative yields (config analysis.yieldWindowNm etc.); defaults as in the config section. */
  readonly yieldWindow?: {
    readonly windowNm?: readonly [number, number];
    readonly scatterExclusionNm: number;
    readonly bandEdgeFraction: number;
    readonly bandEdgeAction: 'refuse' | 'flag';
  };
  /** The standard for the reference used by this set (when one is part of the payload). */
  readonly reference?: {
    readonly standardId: string;
    readonly quantumYield?: number;
    readonly quantumYieldStdUncertainty?: number;
    readonly refractiveIndex?: number;
  };
}

export interface AnalysisJobPayload {
  readonly setId: string;
  readonly role: MeasurementRole;
  readonly sampleId: string;
  /** Sample facts from a manifest (they win over file metadata). */
  readonly sampleInfo: { readonly solvent?: string; readonly excitationNm?: number; readonly standardId?: string };
  readonly files: readonly PayloadFile[];
  /** Parts the set needed but neither had nor could borrow, with the reason. */
  readonly missingParts: readonly { readonly part: SetPart; readonly reason: string }[];
  readonly settings: AnalysisSettings;
  /** When the set was measured (canonical UTC ISO 8601, read at intake by src/model/acquisition-time.ts) and whether that came from the files' metadata or their modification time; without it analyze() reads the first input's metadata. */
  readonly acquisition?: { readonly acquiredAt: string; readonly source: 'metadata' | 'file-modified' };
  /** ISO 8601 time of the analysis (the coordinator's clock). */
  readonly analyzedAt: string;
  /** Set when this run re-analyses a set that already has a result (issue 16.4: its session's reference arrived later). */
  readonly reanalysis?: Reanalysis;
  readonly configHash: string;
  readonly softwareVersion: string;
}

/** A file for the outbox (corrected spectrum, fitted decay), written by the coordinator. */
export interface AnalysisArtifact {
  readonly name: string;
  readonly content: string;
}

/** An own input file the readers rejected during analysis: the coordinator quarantines it with this reason. */
export interface RejectedInput {
  readonly name: string;
  readonly sha256: string;
  readonly code: string;
  readonly message: string;
  readonly hint: string;
  /** 1-based line of the problem, when the reader knows it. */
  readonly line?: number;
}

/** One result and its outbox files. */
export interface MeasurementOutput {
  readonly result: AnalysisResult;
  readonly artifacts: readonly AnalysisArtifact[];
}

/** What a worker returns: the result, its outbox files and the own inputs the readers rejected. */
export interface AnalysisOutput extends MeasurementOutput {
  readonly rejectedInputs?: readonly RejectedInput[];
  /** Results of the further measurements of a file holding several (ids `setId.column`, issue 18.3); absent when none. */
  readonly measurements?: readonly MeasurementOutput[];
  /** Wall time of analyze() in the worker, ms (set by the job processor, not by the pure core; /metrics histograms it). */
  readonly analysisDurationMs?: number;
}
