// How sure a tabulated value is: read in its published source, recalled but not yet re-read there, or a
// convention of the trade. The tables name the source of each value (src/photophysics/standards.ts).

/** confirmed = read in a published text; memory = recalled, not yet read in the source; practice = trade convention. */
export type ReferenceStatus = 'confirmed' | 'memory' | 'practice';
