export * from './values';
export * from './dialect';
export * from './mapping';
export * from './validate';
export * from './manual-entry';
export * from './csv';
export * from './read';
