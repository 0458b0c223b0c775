'use client';

/** Loads the Konva canvas in the browser only (Konva touches window and canvas). */
import dynamic from 'next/dynamic';
import type { ArrayCanvasProps } from './array-canvas';

export const ArrayCanvas = dynamic<ArrayCanvasProps>(() => import('./array-canvas'), {
  ssr: false,
  loading: () => (
    <div
      className="flex h-[340px] items-center justify-center rounded-card border border-ink-100 bg-white text-sm text-ink-500"
      data-testid="array-canvas-loading"
    >
      Loading the array canvas…
    </div>
  ),
});
