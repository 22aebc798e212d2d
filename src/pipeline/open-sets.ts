// The coordinator's in-memory view of open (still assembling) sets, indexed by sample id and by
// manifest, rebuilt from the ledger at start-up. The ledger stays the source of truth.
import type { MeasurementRole } from '../model/spectrum.js';
import type { SetPart } from '../analysis/result.js';
import type { Ledger } from '../store/ledger.js';
import { filesOfSet } from '../store/files.js';
import { setsInState, type SetRecord } from '../store/sets.js';
import type { OpenSetView } from './assemble.js';
import type { SetManifest } from './manifest.js';

/** What a manifest set keeps in sets.manifest_json. */
export interface StoredManifest {
  /** Folder the manifest was found in: listed names resolve against it. */
  readonly dir: string;
  readonly manifest: SetManifest;
}

export interface OpenSet {
  readonly id: string;
  sampleId: string;
  role: MeasurementRole;
  readonly createdAt: Date;
  deadlineAt: Date;
  readonly files: { fileId: number; name: string; path: string; part: SetPart; hasIrfColumn: boolean }[];
  manifest?: StoredManifest;
  /** Supporting measurement that forms a set on its own (IRF, blank, Raman, detector curve). */
  standalone: boolean;
}

/** The assembly view of an open set. */
export function toView(set: OpenSet): OpenSetView {
  return {
    id: set.id,
    sampleId: set.sampleId,
    role: set.role,
    createdAt: set.createdAt,
    deadlineAt: set.deadlineAt,
    files: set.files.map((f) => ({ name: f.name, part: f.part, hasIrfColumn: f.hasIrfColumn })),
    ...(set.manifest === undefined ? {} : { manifestFiles: set.manifest.manifest.files.map((f) => f.file) }),
  };
}

export class OpenSets {
  private readonly byId = new Map<string, OpenSet>();
  /** Open sets by sample id (a set's sample id does not change while it is open). */
  private readonly bySampleId = new Map<string, Set<OpenSet>>();
  /** Open sets declared by a manifest (they may claim files of any sample id). */
  private readonly manifestSets = new Set<OpenSet>();
  /** Insertion order, so candidate lists keep the order in which sets were opened. */
  private readonly order = new Map<OpenSet, number>();
  private sequence = 0;

  /** Rebuilds the view from the ledger's open sets. */
  static load(ledger: Ledger): OpenSets {
    const sets = new OpenSets();
    for (const record of setsInState(ledger, 'open')) sets.add(fromRecord(ledger, record));
    return sets;
  }

  add(set: OpenSet): void {
    this.delete(set.id);
    this.byId.set(set.id, set);
    this.sequence += 1;
    this.order.set(set, this.sequence);
    let same = this.bySampleId.get(set.sampleId);
    if (same === undefined) {
      same = new Set();
      this.bySampleId.set(set.sampleId, same);
    }
    same.add(set);
    if (set.manifest !== undefined) this.manifestSets.add(set);
  }

  get(id: string): OpenSet | undefined {
    return this.byId.get(id);
  }

  delete(id: string): void {
    const set = this.byId.get(id);
    if (set === undefined) return;
    this.byId.delete(id);
    const same = this.bySampleId.get(set.sampleId);
    same?.delete(set);
    if (same?.size === 0) this.bySampleId.delete(set.sampleId);
    this.manifestSets.delete(set);
    this.order.delete(set);
  }

  /** Every open set, oldest first. */
  all(): OpenSet[] {
    return [...this.byId.values()].sort(
      (a, b) => a.createdAt.getTime() - b.createdAt.getTime() || a.id.localeCompare(b.id),
    );
  }

  /** Manifest sets, oldest first (the ones that may claim files already waiting elsewhere). */
  manifests(): OpenSet[] {
    return [...this.manifestSets].sort(
      (a, b) => a.createdAt.getTime() - b.createdAt.getTime() || a.id.localeCompare(b.id),
    );
  }

  /** Candidates for a new file, in insertion order: sets of the same sample id and every manifest set (indexed, so the cost does not grow with the number of open sets). */
  candidatesFor(sampleId: string): OpenSet[] {
    const out = [...(this.bySampleId.get(sampleId) ?? [])];
    for (const set of this.manifestSets) if (set.sampleId !== sampleId) out.push(set);
    return out.sort((a, b) => (this.order.get(a) ?? 0) - (this.order.get(b) ?? 0));
  }

  get size(): number {
    return this.byId.size;
  }
}

/** The open-set view of a set record (its files read from the ledger). */
export function fromRecord(ledger: Ledger, record: SetRecord): OpenSet {
  const files = filesOfSet(ledger, record.id)
    .filter((f) => f.dataType !== 'manifest' && f.part !== null)
    .map((f) => ({ fileId: f.id, name: f.name, path: f.path, part: f.part as SetPart, hasIrfColumn: f.hasIrfColumn }));
  const manifest = record.manifestJson === null ? undefined : (JSON.parse(record.manifestJson) as StoredManifest);
  const role = record.role as MeasurementRole;
  return {
    id: record.id,
    sampleId: record.sampleId,
    role,
    createdAt: new Date(record.createdAt),
    deadlineAt: new Date(record.deadlineAt),
    files,
    ...(manifest === undefined ? {} : { manifest }),
    standalone: role === 'irf' || role === 'blank' || role === 'raman' || role === 'detector-curve',
  };
}
