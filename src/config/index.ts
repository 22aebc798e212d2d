// Public entry of the config module.
export * from './schema.js';
export * from './resolve.js';
export * from './load.js';
export * from './options-table.js';
