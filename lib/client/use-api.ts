'use client';
import useSWR from 'swr';
import { fetcher } from './fetcher';

/** SWR over an app/api path; pass null until the inputs exist. */
export function useApi<T>(key: string | null, fallbackData?: T) {
  const { data, error, isLoading, mutate } = useSWR<T>(key, fetcher, { fallbackData });
  return { data, error: error as Error | undefined, isLoading, mutate };
}
