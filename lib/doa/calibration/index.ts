/** Element calibration: complex gains (gains.ts), the known-bearings fit, self-calibration and the report. */
export * from './gains';
export * from './known-bearings';
export * from './self-calibration';
export * from './report';
