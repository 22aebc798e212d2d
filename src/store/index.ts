// Public entry of the store (the ledger and its typed queries).
export * from './ledger.js';
export * from './migrations.js';
export * from './files.js';
export * from './sets.js';
export * from './results.js';
export * from './status.js';
