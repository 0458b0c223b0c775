'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { Designer } from '@/components/designer/designer';
import { apiSend } from '@/lib/client/fetcher';
import type { ArrayDto } from '@/lib/data/arrays';
import type { ArrayInput } from '@/lib/validations/array';
import { saveErrors } from './save-errors';

/** A starting point for a new design: eight elements at half a wavelength in the S band, two planned sources. */
export const newArrayDefault: ArrayInput = {
  name: 'New array',
  elements: 8,
  spacing: { value: 0.5, unit: 'wavelength' },
  frequencyHz: 3e9,
  medium: { kind: 'radio' },
  steerDeg: 0,
  scanSectorDeg: 45,
  taper: { kind: 'uniform' },
  plannedSources: [{ bearingDeg: -20 }, { bearingDeg: 15 }],
  snapshots: 100,
  snrDb: 10,
};

/** The designer for a new array: saving POSTs revision 1, then opens the array's page. */
export function NewArray() {
  const router = useRouter();
  const [serverErrors, setServerErrors] = useState<Record<string, string[]>>();
  async function save(input: ArrayInput) {
    setServerErrors(undefined);
    try {
      const created = await apiSend<ArrayDto>('POST', '/api/v1/arrays', input);
      router.push(`/arrays/${created.id}`);
    } catch (err) {
      setServerErrors(saveErrors(err));
      throw err;
    }
  }
  return <Designer initial={newArrayDefault} onSave={save} serverErrors={serverErrors} />;
}
