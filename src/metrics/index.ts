export * from './methodology.js';
export * from './windows.js';
export * from './sampling.js';
export * from './moments.js';
export * from './statistics.js';
export * from './kernels.js';
export * from './compute.js';
