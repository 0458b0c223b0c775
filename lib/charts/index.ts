/**
 * Chart definitions: plain functions from data to ECharts option objects (no
 * React, no DOM), used by the page wrapper components/charts/chart.tsx and by
 * the server-side renderer lib/charts/ssr.ts.
 */
export * from './palette';
export * from './common';
export * from './spectrum';
export * from './beam-pattern';
export * from './separation';
export * from './dataset';
export * from './study';
export * from './bearing-time';
export * from './interaction';
export * from './calibration';
