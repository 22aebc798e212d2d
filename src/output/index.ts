// Public entry of the output module (results, outbox, quarantine, archive moves, logger).
export * from './atomic-write.js';
export * from './dated-path.js';
export * from './move-file.js';
export * from './quarantine.js';
export * from './result-writer.js';
export * from './outbox-writer.js';
export * from './logger.js';
