// Public entry of the data model.
export * from './errors.js';
export * from './error-codes.js';
export * from './spectrum.js';
export * from './decay.js';
