export * from './units';
export * from './strength';
export * from './strength-sets';
export * from './adhesion';
export * from './en13813';
export * from './cautions';
export * from './test-methods';
