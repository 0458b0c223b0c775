/** Element calibration: complex gains (gains.ts); fitting from references lives beside it. */
export * from './gains';
