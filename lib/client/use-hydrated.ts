'use client';
import { useSyncExternalStore } from 'react';

const subscribe = () => () => undefined;

/**
 * false in the server's HTML and during hydration, true once React runs the
 * page in the browser. Forms whose inputs react-hook-form registers keep them
 * disabled until then, so nothing typed before hydration is overwritten.
 */
export function useHydrated(): boolean {
  return useSyncExternalStore(
    subscribe,
    () => true,
    () => false,
  );
}
