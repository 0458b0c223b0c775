// Wideband bearing–time records (see lib/doa/README.md, "Wideband bearing–time records").
export * from './plan';
export * from './source';
export * from './analyze';
export * from './crb';
export * from './record';
export * from './tracker';
export * from './simulate';
