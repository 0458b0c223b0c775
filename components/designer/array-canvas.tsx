'use client';

/**
 * The array drawn to scale on a react-konva stage (load it through
 * array-canvas-lazy.tsx: Konva needs the browser).
 *
 * World units are wavelengths: element m sits at x = m·d on the axis. The view
 * maps x to screen px as x0 + x·scale; the axis is a horizontal line, broadside
 * points up, and a bearing θ is drawn as an arrow arriving from
 * (sin θ, cos θ) toward the array centre, positive toward the larger m (right).
 *
 * Mouse: click an element to disable/enable it, drag an element (not element 1,
 * the reference at x = 0) to stretch the spacing, click the axis or the "+"
 * handle to add, click the "×" above a hovered element to remove it, drag a
 * source handle to change its bearing, wheel to zoom, drag the background to pan.
 * Keyboard: every element and source has a focusable overlay control (see the
 * key help under the canvas).
 *
 * Test hooks: overlay controls carry data-testid and sit exactly over what they
 * stand for (their box centre is the shape's centre; pointer-events are off so
 * the mouse reaches the canvas) and carry those coordinates in canvas px as
 * data-x / data-y (full precision).
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Stage, Layer, Rect, Line, Circle, Group, Text, Arrow } from 'react-konva';
import type Konva from 'konva';
import type { DesignerAction, DesignerDraft } from '@/lib/designer/state';
import { MIN_DRAG_SPACING_WAVELENGTHS, MAX_DRAG_SPACING_WAVELENGTHS } from '@/lib/designer/state';
import { MAX_ELEMENTS, MIN_ELEMENTS } from '@/lib/validations/array';
import { cn } from '@/lib/client/cn';

export interface ArrayCanvasProps {
  draft: DesignerDraft;
  /** The spacing d in wavelengths (resolved from the draft's unit). */
  spacingWavelengths: number;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
  /** Stage height in px, default 340. */
  height?: number;
}

interface View {
  scale: number;
  x0: number;
  axisY: number;
}

const COLORS = {
  axis: '#9fb1c1',
  ruler: '#6f879c',
  rulerText: '#4e667b',
  element: '#207b6d',
  elementStroke: '#19423d',
  disabledFill: '#ffffff',
  disabledStroke: '#9fb1c1',
  active: '#f79a24',
  source: '#bb5606',
  sourceSoft: '#fcd38a',
  handle: '#2b9986',
  remove: '#c13a26',
  text: '#1b2938',
};

const DEG = Math.PI / 180;
const MARGIN = 56;

function niceStep(scale: number): number {
  for (const step of [0.05, 0.1, 0.25, 0.5, 1, 2, 5, 10, 20, 50, 100]) if (step * scale >= 44) return step;
  return 200;
}

function fitView(width: number, height: number, aperture: number, spacing: number): View {
  // Leave room for the "+" handle one spacing past the last element.
  const span = Math.max(aperture + spacing, 0.5);
  const scale = Math.max(1e-3, (width - 2 * MARGIN) / span);
  return { scale, x0: (width - span * scale) / 2, axisY: Math.round(height * 0.74) };
}

export default function ArrayCanvas({
  draft,
  spacingWavelengths: d,
  dispatch,
  readOnly = false,
  height = 340,
}: ArrayCanvasProps) {
  const containerRef = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(720);
  const [autoFit, setAutoFit] = useState(true);
  const [manualView, setManualView] = useState<View | null>(null);
  const [dragging, setDragging] = useState<null | { kind: 'element' | 'source'; view: View }>(null);
  const [active, setActive] = useState<number | null>(null);
  const m = draft.elements;
  const aperture = (m - 1) * d;

  useEffect(() => {
    const el = containerRef.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidth(Math.max(280, Math.floor(el.clientWidth))));
    ro.observe(el);
    setWidth(Math.max(280, Math.floor(el.clientWidth)));
    return () => ro.disconnect();
  }, []);

  const fitted = useMemo(() => fitView(width, height, aperture, d), [width, height, aperture, d]);
  // While dragging, the view is frozen so the shape stays under the pointer.
  const view: View = dragging ? dragging.view : autoFit || !manualView ? fitted : manualView;
  const toScreenX = useCallback((x: number) => view.x0 + x * view.scale, [view]);
  const centerX = toScreenX(aperture / 2);
  const arrowRadius = Math.min(view.axisY - 24, Math.max(120, width * 0.3));
  const elementRadius = Math.max(3, Math.min(9, d * view.scale * 0.32));

  const elements = useMemo(
    () => draft.elementStates.map((s, i) => ({ index: i, x: toScreenX(i * d), y: view.axisY, enabled: s.enabled })),
    [draft.elementStates, toScreenX, d, view.axisY],
  );
  const sources = useMemo(
    () =>
      draft.plannedSources.map((s, i) => ({
        index: i,
        bearingDeg: s.bearingDeg,
        x: centerX + arrowRadius * Math.sin(s.bearingDeg * DEG),
        y: view.axisY - arrowRadius * Math.cos(s.bearingDeg * DEG),
      })),
    [draft.plannedSources, centerX, arrowRadius, view.axisY],
  );
  const addHandle = !readOnly && m < MAX_ELEMENTS ? { x: toScreenX(m * d), y: view.axisY } : null;
  const removeHandle =
    !readOnly && active !== null && active < m && m > MIN_ELEMENTS
      ? { index: active, x: toScreenX(active * d), y: view.axisY - 28 }
      : null;

  const freezeView = (kind: 'element' | 'source') => setDragging({ kind, view });
  const endDrag = () => {
    if (dragging) {
      // Keep the view the user saw while dragging unless auto-fit is on.
      if (!autoFit) setManualView(dragging.view);
    }
    setDragging(null);
  };

  const zoomAt = (factor: number, px: number) => {
    const v = view;
    const scale = Math.min(5000, Math.max(0.5, v.scale * factor));
    const f = scale / v.scale;
    setManualView({ scale, x0: px - (px - v.x0) * f, axisY: v.axisY });
    setAutoFit(false);
  };

  const onWheel = (e: Konva.KonvaEventObject<WheelEvent>) => {
    e.evt.preventDefault();
    const stage = e.target.getStage();
    const p = stage?.getPointerPosition();
    zoomAt(e.evt.deltaY < 0 ? 1.15 : 1 / 1.15, p ? p.x : width / 2);
  };

  const onAxisClick = (e: Konva.KonvaEventObject<MouseEvent>) => {
    if (readOnly) return;
    const p = e.target.getStage()?.getPointerPosition();
    if (!p) return;
    const k = (p.x - view.x0) / view.scale / d;
    if (k > m - 1 + 0.3) dispatch({ type: 'addElement' });
    else if (k < -0.3) dispatch({ type: 'addElement', at: 0 });
    else if (Math.abs(k - Math.round(k)) >= 0.3) dispatch({ type: 'addElement', at: Math.ceil(k) });
  };

  // Ruler ticks from element 0 across the aperture.
  const step = niceStep(view.scale);
  const ticks: number[] = [];
  const rulerEnd = Math.max(aperture, step);
  for (let i = 0; i * step <= rulerEnd + 1e-9 && ticks.length < 400; i++) ticks.push(i * step);
  const rulerY = view.axisY + 30;
  const fmtTick = (x: number) => (step < 1 ? x.toFixed(step < 0.1 ? 2 : step < 0.5 ? 2 : 1) : String(Math.round(x)));

  const onElementKey = (index: number) => (e: React.KeyboardEvent) => {
    if (readOnly) return;
    const big = e.shiftKey ? 0.1 : 0.01;
    switch (e.key) {
      case 'ArrowRight':
      case 'ArrowUp':
        e.preventDefault();
        dispatch({
          type: 'setSpacingWavelengths',
          spacingWavelengths: Math.min(MAX_DRAG_SPACING_WAVELENGTHS, Math.round((d + big) * 1e4) / 1e4),
        });
        break;
      case 'ArrowLeft':
      case 'ArrowDown':
        e.preventDefault();
        dispatch({
          type: 'setSpacingWavelengths',
          spacingWavelengths: Math.max(MIN_DRAG_SPACING_WAVELENGTHS, Math.round((d - big) * 1e4) / 1e4),
        });
        break;
      case 'Enter':
      case ' ':
        e.preventDefault();
        dispatch({ type: 'toggleElement', index });
        break;
      case '+':
      case '=':
        e.preventDefault();
        dispatch({ type: 'addElement', at: index + 1 });
        break;
      case '-':
      case 'Delete':
      case 'Backspace':
        e.preventDefault();
        dispatch({ type: 'removeElement', index });
        break;
    }
  };

  const onSourceKey = (index: number, bearing: number) => (e: React.KeyboardEvent) => {
    if (readOnly) return;
    const stepDeg = e.shiftKey ? 5 : 0.5;
    if (e.key === 'ArrowRight' || e.key === 'ArrowUp') {
      e.preventDefault();
      dispatch({ type: 'moveSource', index, bearingDeg: Math.round((bearing + stepDeg) * 100) / 100 });
    } else if (e.key === 'ArrowLeft' || e.key === 'ArrowDown') {
      e.preventDefault();
      dispatch({ type: 'moveSource', index, bearingDeg: Math.round((bearing - stepDeg) * 100) / 100 });
    } else if (e.key === 'Delete' || e.key === 'Backspace' || e.key === '-') {
      e.preventDefault();
      dispatch({ type: 'removeSource', index });
    }
  };

  const overlayBox = (x: number, y: number, size: number) => ({
    left: x - size / 2,
    top: y - size / 2,
    width: size,
    height: size,
  });

  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-center gap-2 text-sm" role="toolbar" aria-label="Canvas view">
        <button
          type="button"
          className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50"
          onClick={() => zoomAt(1.25, width / 2)}
          aria-label="Zoom in"
          data-testid="zoom-in"
        >
          +
        </button>
        <button
          type="button"
          className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50"
          onClick={() => zoomAt(0.8, width / 2)}
          aria-label="Zoom out"
          data-testid="zoom-out"
        >
          −
        </button>
        <button
          type="button"
          className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50"
          onClick={() => {
            setAutoFit(true);
            setManualView(null);
          }}
          data-testid="zoom-fit"
        >
          Fit
        </button>
        <span className="text-xs text-ink-500 tabular">
          {autoFit ? 'fitted' : `${(view.scale / fitted.scale).toFixed(2)}×`} · ruler step {step} λ
        </span>
        {!readOnly ? (
          <>
            <span className="mx-1 h-4 w-px bg-ink-200" aria-hidden />
            <button
              type="button"
              className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50 disabled:opacity-40"
              disabled={m >= MAX_ELEMENTS}
              onClick={() => dispatch({ type: 'addElement' })}
              data-testid="add-element"
            >
              Add element
            </button>
            <button
              type="button"
              className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50 disabled:opacity-40"
              disabled={m <= MIN_ELEMENTS}
              onClick={() => dispatch({ type: 'removeElement', index: m - 1 })}
              data-testid="remove-last-element"
            >
              Remove last
            </button>
            <button
              type="button"
              className="rounded-md px-2 py-1 ring-1 ring-ink-200 hover:bg-ink-50 disabled:opacity-40"
              disabled={draft.plannedSources.length >= 32}
              onClick={() =>
                dispatch({
                  type: 'addSource',
                  bearingDeg: draft.plannedSources.length
                    ? Math.max(-85, Math.min(85, draft.plannedSources[draft.plannedSources.length - 1].bearingDeg + 15))
                    : 20,
                })
              }
              data-testid="add-source"
            >
              Add source arrow
            </button>
          </>
        ) : null}
      </div>
      <div
        ref={containerRef}
        className="relative w-full overflow-hidden rounded-card border border-ink-100 bg-white"
        style={{ height }}
        data-testid="array-canvas"
      >
        <Stage width={width} height={height} onWheel={onWheel}>
          <Layer>
            <Rect
              x={0}
              y={0}
              width={width}
              height={height}
              fill="#ffffff"
              draggable
              onDragStart={() => setAutoFit(false)}
              onDragMove={(e) => {
                const dx = e.target.x();
                e.target.position({ x: 0, y: 0 });
                setManualView({ ...view, x0: view.x0 + dx });
              }}
            />
            {/* the axis and its click band */}
            <Line points={[0, view.axisY, width, view.axisY]} stroke={COLORS.axis} strokeWidth={1} listening={false} />
            <Rect
              x={0}
              y={view.axisY - 9}
              width={width}
              height={18}
              fill="rgba(0,0,0,0)"
              onClick={onAxisClick}
              onTap={onAxisClick as never}
            />
            {/* wavelength ruler */}
            <Line
              points={[toScreenX(0), rulerY, toScreenX(rulerEnd), rulerY]}
              stroke={COLORS.ruler}
              strokeWidth={1}
              listening={false}
            />
            {ticks.map((t) => (
              <Group key={t} listening={false}>
                <Line
                  points={[toScreenX(t), rulerY - 4, toScreenX(t), rulerY + 4]}
                  stroke={COLORS.ruler}
                  strokeWidth={1}
                />
                <Text
                  x={toScreenX(t) - 20}
                  y={rulerY + 7}
                  width={40}
                  align="center"
                  text={`${fmtTick(t)}λ`}
                  fontSize={10}
                  fill={COLORS.rulerText}
                />
              </Group>
            ))}
            {/* broadside reference */}
            <Line
              points={[centerX, view.axisY - 10, centerX, view.axisY - arrowRadius - 6]}
              stroke="#e3e9ee"
              dash={[4, 4]}
              listening={false}
            />
            <Text
              x={centerX - 40}
              y={view.axisY - arrowRadius - 22}
              width={80}
              align="center"
              text="broadside 0°"
              fontSize={10}
              fill={COLORS.ruler}
              listening={false}
            />
            {/* planned sources */}
            {sources.map((s) => {
              const tipR = 22;
              const tipX = centerX + tipR * Math.sin(s.bearingDeg * DEG);
              const tipY = view.axisY - tipR * Math.cos(s.bearingDeg * DEG);
              return (
                <Group key={`src-${s.index}`}>
                  <Arrow
                    points={[s.x, s.y, tipX, tipY]}
                    stroke={COLORS.source}
                    fill={COLORS.source}
                    strokeWidth={2}
                    pointerLength={9}
                    pointerWidth={8}
                    dash={[7, 4]}
                    listening={false}
                  />
                  <Circle
                    x={s.x}
                    y={s.y}
                    radius={9}
                    fill={COLORS.sourceSoft}
                    stroke={COLORS.source}
                    strokeWidth={2}
                    draggable={!readOnly}
                    onDragStart={() => freezeView('source')}
                    onDragMove={(e) => {
                      const v = dragging?.view ?? view;
                      const cx = v.x0 + (aperture / 2) * v.scale;
                      const theta = Math.atan2(e.target.x() - cx, v.axisY - e.target.y()) / DEG;
                      const bearingDeg = Math.round(Math.max(-90, Math.min(90, theta)) * 10) / 10;
                      dispatch({ type: 'moveSource', index: s.index, bearingDeg });
                    }}
                    onDragEnd={endDrag}
                  />
                  <Text
                    x={s.x + 12}
                    y={s.y - 6 + (s.index % 3) * 12}
                    text={`S${s.index + 1} ${s.bearingDeg.toFixed(1)}°`}
                    fontSize={11}
                    fill={COLORS.source}
                    listening={false}
                  />
                </Group>
              );
            })}
            {/* elements */}
            {elements.map((el) => (
              <Circle
                key={`el-${el.index}`}
                x={el.x}
                y={el.y}
                radius={elementRadius}
                fill={el.enabled ? COLORS.element : COLORS.disabledFill}
                stroke={active === el.index ? COLORS.active : el.enabled ? COLORS.elementStroke : COLORS.disabledStroke}
                strokeWidth={active === el.index ? 3 : el.enabled ? 1 : 2}
                dash={el.enabled ? undefined : [3, 2]}
                hitStrokeWidth={8}
                draggable={!readOnly && el.index > 0}
                dragBoundFunc={(pos) => ({ x: Math.max(view.x0 + 4, pos.x), y: view.axisY })}
                onMouseEnter={() => setActive(el.index)}
                onClick={() => !readOnly && dispatch({ type: 'toggleElement', index: el.index })}
                onTap={() => !readOnly && dispatch({ type: 'toggleElement', index: el.index })}
                onDragStart={() => freezeView('element')}
                onDragMove={(e) => {
                  const v = dragging?.view ?? view;
                  dispatch({
                    type: 'dragElement',
                    index: el.index,
                    positionWavelengths: (e.target.x() - v.x0) / v.scale,
                  });
                }}
                onDragEnd={endDrag}
              />
            ))}
            {elements
              .filter((el) => !el.enabled)
              .map((el) => (
                <Line
                  key={`x-${el.index}`}
                  points={[el.x - elementRadius, el.y + elementRadius, el.x + elementRadius, el.y - elementRadius]}
                  stroke={COLORS.remove}
                  strokeWidth={1.5}
                  listening={false}
                />
              ))}
            {m <= 64
              ? elements.map((el) => (
                  <Text
                    key={`lbl-${el.index}`}
                    x={el.x - 12}
                    y={el.y + elementRadius + 3}
                    width={24}
                    align="center"
                    text={String(el.index + 1)}
                    fontSize={9}
                    fill={COLORS.rulerText}
                    listening={false}
                  />
                ))
              : null}
            {addHandle ? (
              <Group
                x={addHandle.x}
                y={addHandle.y}
                onClick={() => dispatch({ type: 'addElement' })}
                onTap={() => dispatch({ type: 'addElement' })}
              >
                <Circle radius={9} fill="#ffffff" stroke={COLORS.handle} strokeWidth={1.5} dash={[2, 2]} />
                <Text x={-5} y={-7} text="+" fontSize={14} fill={COLORS.handle} />
              </Group>
            ) : null}
            {removeHandle ? (
              <Group
                x={removeHandle.x}
                y={removeHandle.y}
                onClick={() => {
                  dispatch({ type: 'removeElement', index: removeHandle.index });
                  setActive(null);
                }}
                onTap={() => {
                  dispatch({ type: 'removeElement', index: removeHandle.index });
                  setActive(null);
                }}
              >
                <Circle radius={8} fill="#ffffff" stroke={COLORS.remove} strokeWidth={1.5} />
                <Text x={-4} y={-6} text="×" fontSize={13} fill={COLORS.remove} />
              </Group>
            ) : null}
            <Text
              x={8}
              y={8}
              text={`${m} elements · d = ${d.toFixed(4)} λ · aperture ${aperture.toFixed(3)} λ`}
              fontSize={11}
              fill={COLORS.text}
              listening={false}
            />
          </Layer>
        </Stage>
        {/* Keyboard and test overlay: focusable controls exactly over the shapes; the mouse passes through. */}
        <div className="pointer-events-none absolute inset-0" aria-label="Array elements and source arrows">
          {elements.map((el) => (
            <button
              key={`ov-${el.index}`}
              type="button"
              data-testid={`element-${el.index}`}
              data-x={String(el.x)}
              data-y={String(el.y)}
              data-enabled={el.enabled ? 'true' : 'false'}
              aria-pressed={el.enabled}
              aria-label={`Element ${el.index + 1} of ${m}, ${el.enabled ? 'enabled' : 'disabled'}, at ${(el.index * d).toFixed(3)} wavelengths`}
              disabled={readOnly}
              tabIndex={readOnly ? -1 : 0}
              onFocus={() => setActive(el.index)}
              onKeyDown={onElementKey(el.index)}
              className={cn(
                'absolute rounded-full bg-transparent focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-amber-500',
              )}
              style={overlayBox(el.x, el.y, Math.max(12, elementRadius * 2 + 4))}
            />
          ))}
          {sources.map((s) => (
            <button
              key={`ovs-${s.index}`}
              type="button"
              data-testid={`source-${s.index}`}
              data-x={s.x.toFixed(2)}
              data-y={s.y.toFixed(2)}
              data-bearing-deg={String(s.bearingDeg)}
              aria-label={`Source ${s.index + 1} at ${s.bearingDeg.toFixed(1)} degrees; arrow keys turn it, Delete removes it`}
              disabled={readOnly}
              tabIndex={readOnly ? -1 : 0}
              onKeyDown={onSourceKey(s.index, s.bearingDeg)}
              className="absolute rounded-full bg-transparent focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-amber-500"
              style={overlayBox(s.x, s.y, 20)}
            />
          ))}
          {addHandle ? (
            <span
              data-testid="add-handle"
              data-x={addHandle.x.toFixed(2)}
              data-y={addHandle.y.toFixed(2)}
              className="absolute"
              style={overlayBox(addHandle.x, addHandle.y, 18)}
            />
          ) : null}
          {removeHandle ? (
            <span
              data-testid="remove-handle"
              data-index={removeHandle.index}
              className="absolute"
              style={overlayBox(removeHandle.x, removeHandle.y, 16)}
            />
          ) : null}
        </div>
      </div>
      <p className="text-xs text-ink-500" id="canvas-keys">
        {readOnly
          ? 'Read-only: the canvas shows the saved geometry; zoom and pan still work.'
          : 'Mouse: click an element to disable or enable it; drag an element to stretch the spacing (element 1 stays at 0); click the axis or “+” to add; hover an element and click “×” to remove; drag a source handle to turn it; wheel zooms, dragging the background pans. Keyboard: Tab to an element, ←/→ change the spacing (Shift for larger steps), Enter or Space toggles, + adds after it, − or Delete removes it; on a source, ←/→ turn it, Delete removes it.'}
      </p>
    </div>
  );
}
