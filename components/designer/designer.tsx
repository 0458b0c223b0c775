'use client';

/**
 * The array designer: canvas, form, live figures, beam pattern and the
 * separation chart around one reducer (lib/designer/state.ts).
 *
 * Props: `initial` (an array input, as the API or a saved revision gives it),
 * `readOnly` (show everything, edit nothing) and `onSave(input)` (the page
 * wires this to POST/PATCH /api/v1/arrays; 422 `fields` can be passed back as
 * `serverErrors`).
 */
import { useDeferredValue, useMemo, useReducer } from 'react';
import type { ArrayInput } from '@/lib/validations/array';
import { designerReducer, enabledSummary, normalizeDraft } from '@/lib/designer/state';
import { chartLookDeg, designFigures, designPattern, pairAdvice, separationCurves } from '@/lib/designer/analysis';
import { ArrayCanvas } from './array-canvas-lazy';
import { DesignerForm } from './designer-form';
import { FiguresPanel } from './figures-panel';
import { BeamPatternChart } from './beam-pattern-chart';
import { SeparationChart } from './separation-chart';
import { DisabledElementsNotice } from './disabled-elements-notice';

export interface DesignerProps {
  initial: ArrayInput;
  readOnly?: boolean;
  onSave?: (input: ArrayInput) => void | Promise<void>;
  /** 422 field errors from the server, keyed by field name. */
  serverErrors?: Record<string, string[]>;
}

function Panel({
  title,
  children,
  testId,
  aside,
}: {
  title: string;
  children: React.ReactNode;
  testId?: string;
  aside?: React.ReactNode;
}) {
  return (
    <section
      className="rounded-card border border-ink-100 bg-white p-4 shadow-card"
      data-testid={testId}
      aria-label={title}
    >
      <div className="mb-3 flex items-baseline justify-between gap-2">
        <h2 className="text-base font-semibold">{title}</h2>
        {aside}
      </div>
      {children}
    </section>
  );
}

export function Designer({ initial, readOnly = false, onSave, serverErrors }: DesignerProps) {
  const [draft, rawDispatch] = useReducer(designerReducer, initial, normalizeDraft);
  const dispatch = useMemo(() => (readOnly ? () => undefined : rawDispatch), [readOnly]);
  const deferred = useDeferredValue(draft);

  const figures = useMemo(() => designFigures(draft), [draft]);
  const pattern = useMemo(() => designPattern(draft), [draft]);
  const curves = useMemo(() => separationCurves(deferred), [deferred]);
  const pairs = useMemo(() => pairAdvice(deferred), [deferred]);
  const summary = enabledSummary(draft.elementStates);
  const taperLabel =
    draft.taper.kind === 'chebyshev' ? `Dolph–Chebyshev ${draft.taper.sidelobeDb} dB` : `${draft.taper.kind} taper`;

  return (
    <div className="space-y-4" data-testid="designer" data-read-only={readOnly ? 'true' : 'false'}>
      {/* The draft for tests and tooling, as a data-* attribute (no globals on window). */}
      <output hidden data-testid="designer-state" data-json={JSON.stringify(draft)} />
      {readOnly ? (
        <p className="rounded-md border border-ink-200 bg-ink-50 px-3 py-2 text-sm text-ink-700" role="status">
          Read-only: you can inspect every figure, zoom the canvas and export, but not change the design.
        </p>
      ) : null}
      <div className="grid gap-4 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0 space-y-4">
          <Panel title={draft.name || 'Untitled array'} testId="canvas-panel">
            <ArrayCanvas
              draft={draft}
              spacingWavelengths={figures.spacingWavelengths}
              dispatch={dispatch}
              readOnly={readOnly}
            />
            {summary.disabled.length ? <DisabledElementsNotice summary={summary} elements={draft.elements} /> : null}
          </Panel>
          <Panel title="Beam pattern" testId="pattern-panel">
            <BeamPatternChart
              draft={draft}
              pattern={pattern}
              figures={figures}
              dispatch={dispatch}
              readOnly={readOnly}
            />
          </Panel>
          <Panel
            title="Separation versus aperture"
            testId="separation-panel"
            aside={deferred !== draft ? <span className="text-2xs text-ink-400">updating…</span> : null}
          >
            <SeparationChart
              draft={deferred}
              curves={curves}
              pairs={pairs}
              spacingWavelengths={figures.spacingWavelengths}
              lookDeg={chartLookDeg(deferred)}
              dispatch={dispatch}
              readOnly={readOnly}
            />
          </Panel>
        </div>
        <div className="min-w-0 space-y-4">
          <Panel title="Figures" testId="figures">
            <FiguresPanel figures={figures} taperLabel={taperLabel} enabledCount={summary.enabledCount} />
          </Panel>
          <DesignerForm
            draft={draft}
            geometry={figures.geometry}
            dispatch={dispatch}
            readOnly={readOnly}
            onSave={onSave}
            serverErrors={serverErrors}
          />
        </div>
      </div>
    </div>
  );
}
