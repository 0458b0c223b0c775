'use client';

import { useState } from 'react';
import { Designer } from '@/components/designer/designer';
import type { ArrayInput } from '@/lib/validations/array';

/** Invented demo: a hydrophone line off the fictional Port Alder. */
const demo: ArrayInput = {
  name: 'Port Alder 16-element hydrophone line, 3 kHz',
  elements: 16,
  spacing: { value: 0.25, unit: 'm' },
  frequencyHz: 3000,
  medium: { kind: 'sea-water', temperatureC: 9, salinityPpt: 34, depthM: 40, equation: 'mackenzie-1981' },
  steerDeg: 0,
  scanSectorDeg: 60,
  taper: { kind: 'uniform' },
  plannedSources: [{ bearingDeg: -30 }, { bearingDeg: 10 }, { bearingDeg: 14 }],
  snapshots: 200,
  snrDb: 5,
};

export function HarnessClient({ readOnly }: { readOnly: boolean }) {
  const [saved, setSaved] = useState<ArrayInput | null>(null);
  return (
    <>
      <Designer initial={demo} readOnly={readOnly} onSave={(input) => setSaved(input)} />
      {saved ? (
        <pre data-testid="harness-saved" className="mt-4 max-h-60 overflow-auto rounded-md bg-ink-900 p-3 text-xs text-ink-50">
          {JSON.stringify(saved, null, 2)}
        </pre>
      ) : null}
    </>
  );
}
