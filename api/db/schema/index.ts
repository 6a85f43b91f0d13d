// The Drizzle schema, one file a domain; drizzle-kit reads this folder (drizzle.config.ts).
export * from './users';
export * from './audit';
export * from './catalogue';
export * from './files';
export * from './results';
export * from './spc';
export * from './mail';
export * from './quality';
