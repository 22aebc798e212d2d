// How sure a tabulated value is, as marked in /work/shared/REFERENCES.md.

/** confirmed = read in a published text; memory = recalled, not yet read in the source; practice = trade convention. */
export type ReferenceStatus = 'confirmed' | 'memory' | 'practice';
