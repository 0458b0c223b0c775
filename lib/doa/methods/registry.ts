/**
 * The method registry: published names kept exactly (docs/conventions.md §4).
 * To add a method, implement a MethodRunner (method-types.ts) in its own file
 * and add it here and to DOA_METHODS; see README "Adding a method".
 */
import { runBartlett, runMvdr } from './beamformers';
import { runEspritLs, runEspritTls } from './esprit';
import { MethodRunner } from './types';
import { runMusic } from './music';
import { runRootMusic } from './root-music';
import { runEspritUnitary } from './unitary-esprit';

export const DOA_METHODS = [
  'esprit-ls',
  'esprit-tls',
  'esprit-unitary',
  'music',
  'root-music',
  'bartlett',
  'mvdr',
] as const;
export type DoaMethod = (typeof DOA_METHODS)[number];

export const METHOD_RUNNERS: Readonly<Record<DoaMethod, MethodRunner>> = Object.freeze({
  'esprit-ls': runEspritLs,
  'esprit-tls': runEspritTls,
  'esprit-unitary': runEspritUnitary,
  music: runMusic,
  'root-music': runRootMusic,
  bartlett: runBartlett,
  mvdr: runMvdr,
});

export const ESPRIT_METHODS: ReadonlySet<DoaMethod> = new Set<DoaMethod>(['esprit-ls', 'esprit-tls', 'esprit-unitary']);
export const SPECTRAL_METHODS: ReadonlySet<DoaMethod> = new Set<DoaMethod>(['music', 'bartlett', 'mvdr']);

export function isDoaMethod(name: unknown): name is DoaMethod {
  return typeof name === 'string' && (DOA_METHODS as readonly string[]).includes(name);
}

/** Subarray size advised for ESPRIT smoothing: ⌈2M/3⌉, kept within 2 … M−1. */
export function recommendedSmoothingSubarray(elements: number): number {
  return Math.max(2, Math.min(elements - 1, Math.ceil((2 * elements) / 3)));
}
