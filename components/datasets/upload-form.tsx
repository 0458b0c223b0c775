'use client';
import { useRef, useState } from 'react';
import { useRouter } from 'next/navigation';
import { getCsrfToken } from 'next-auth/react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage, inputClass } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';
import { cn } from '@/lib/client/cn';

export type ArrayOption = {
  id: number;
  name: string;
  revision: number;
  elements: number;
  spacingWavelengths: number;
  disabledElements: number[];
};

type Refusal = { message: string; fields?: Record<string, string[]> };

/**
 * Uploads one snapshot file with XMLHttpRequest so the browser can show the
 * bytes sent (fetch has no upload progress). The server answers after it has
 * stored and checked the file; until then the bar reads "checking".
 */
export function UploadForm({ arrays, maxBytes }: { arrays: ArrayOption[]; maxBytes: number }) {
  const router = useRouter();
  const fileRef = useRef<HTMLInputElement>(null);
  const [fileName, setFileName] = useState('');
  const [progress, setProgress] = useState<number | null>(null);
  const [phase, setPhase] = useState<'idle' | 'sending' | 'checking'>('idle');
  const [error, setError] = useState<Refusal | null>(null);
  const ext = fileName.toLowerCase().split('.').pop() ?? '';
  const isWav = ext === 'wav';
  const isHdf5 = ext === 'h5' || ext === 'hdf5';

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setError(null);
    const form = new FormData(e.currentTarget);
    const file = form.get('file');
    if (!(file instanceof File) || !file.name) {
      setError({ message: 'Choose a file to upload.', fields: { file: ['a file is required'] } });
      return;
    }
    if (file.size > maxBytes) {
      setError({
        message: `The file is ${(file.size / 1048576).toFixed(1)} MiB; the upload limit is ${(maxBytes / 1048576).toFixed(0)} MiB.`,
      });
      return;
    }
    for (const [k, v] of [...form.entries()]) if (v === '') form.delete(k);
    const csrf = await getCsrfToken();
    setPhase('sending');
    setProgress(0);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/v1/datasets');
    if (csrf) xhr.setRequestHeader('x-csrf-token', csrf);
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (ev) => {
      if (ev.lengthComputable) setProgress(ev.loaded / ev.total);
    };
    xhr.upload.onload = () => {
      setProgress(1);
      setPhase('checking');
    };
    xhr.onerror = () => {
      setPhase('idle');
      setProgress(null);
      setError({ message: 'The upload was interrupted (network error). Nothing was stored; try again.' });
    };
    xhr.onload = () => {
      let body: { id?: number; error?: Refusal } = {};
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status === 201 && body.id) {
        router.push(`/datasets/${body.id}`);
        router.refresh();
        return;
      }
      setPhase('idle');
      setProgress(null);
      setError(body.error ?? { message: `The upload failed (${xhr.status}).` });
    };
    xhr.send(form);
  }

  const busy = phase !== 'idle';
  return (
    <form onSubmit={submit} className="grid gap-4 px-5 py-4" aria-label="Upload a dataset" noValidate>
      <div>
        <label htmlFor="file" className="block text-sm font-medium text-ink-800">
          Snapshot file
        </label>
        <input
          ref={fileRef}
          id="file"
          name="file"
          type="file"
          accept=".csv,.txt,.npy,.h5,.hdf5,.wav"
          onChange={(e) => setFileName(e.target.files?.[0]?.name ?? '')}
          aria-invalid={error?.fields?.file ? true : undefined}
          aria-describedby="file-hint"
          className={cn(
            inputClass,
            'mt-1 file:mr-3 file:rounded file:border-0 file:bg-glass-50 file:px-2 file:py-1 file:text-glass-800',
          )}
        />
        <p id="file-hint" className="mt-1 text-xs text-ink-500">
          CSV or text (complex a+bj), NPY, HDF5 or multichannel WAV; one snapshot per row, one element per column. Up to{' '}
          {(maxBytes / 1048576).toFixed(0)} MiB.
        </p>
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field id="name" label="Name (optional)" placeholder="e.g. Harbour wall, run 3" maxLength={200} />
        <div>
          <label htmlFor="arrayId" className="block text-sm font-medium text-ink-800">
            Array (optional)
          </label>
          <select
            id="arrayId"
            name="arrayId"
            className={cn(inputClass, 'mt-1')}
            defaultValue=""
            aria-invalid={error?.fields?.arrayId ? true : undefined}
            aria-describedby={error?.fields?.arrayId ? 'arrayId-error' : undefined}
          >
            <option value="">No array yet</option>
            {arrays.map((a) => (
              <option key={a.id} value={a.id}>
                {a.name} (r{a.revision}, {a.elements} elements, d = {a.spacingWavelengths} λ)
              </option>
            ))}
          </select>
          {error?.fields?.arrayId ? (
            <p id="arrayId-error" className="mt-1 text-xs font-medium text-coral-600">
              {error.fields.arrayId[0]}
            </p>
          ) : null}
        </div>
      </div>
      {isHdf5 ? (
        <Field
          id="datasetPath"
          label="HDF5 dataset path"
          placeholder="/snapshots (optional when the file has one 2-D dataset)"
        />
      ) : null}
      {isWav ? (
        <fieldset className="grid gap-4 rounded-md border border-ink-100 p-3 sm:grid-cols-4">
          <legend className="px-1 text-xs font-medium text-ink-600">WAV: short-time Fourier transform</legend>
          <Field id="frequencyHz" label="Analysis frequency (Hz)" type="number" step="any" min="0" required />
          <Field id="fftLength" label="FFT length" type="number" placeholder="1024" />
          <Field id="hop" label="Hop (samples)" type="number" placeholder="= FFT length" />
          <div>
            <label htmlFor="window" className="block text-sm font-medium text-ink-800">
              Window
            </label>
            <select id="window" name="window" className={cn(inputClass, 'mt-1')} defaultValue="hann">
              <option value="hann">Hann</option>
              <option value="hamming">Hamming</option>
              <option value="rectangular">Rectangular</option>
            </select>
          </div>
        </fieldset>
      ) : null}
      {progress !== null ? (
        <div>
          <div className="flex justify-between text-xs text-ink-600">
            <span>{phase === 'checking' ? 'Checking and storing the file…' : `Uploading ${fileName}`}</span>
            <span className="tabular">{Math.round(progress * 100)}%</span>
          </div>
          <ProgressBar
            fraction={progress}
            label="Upload progress"
            minPercent={0}
            pulse={phase === 'checking'}
            className="mt-1"
          />
        </div>
      ) : null}
      {error ? (
        <FormMessage tone="error">
          {error.message}
          {error.fields?.location ? <span className="block text-xs">At {error.fields.location[0]}.</span> : null}
        </FormMessage>
      ) : null}
      <div>
        <Button type="submit" disabled={busy}>
          {busy ? 'Uploading…' : 'Upload'}
        </Button>
      </div>
    </form>
  );
}
