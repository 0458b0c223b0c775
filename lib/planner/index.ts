// Aperture planner (pure; no React, Next or database imports).
export * from './efficiency';
export * from './plan';
