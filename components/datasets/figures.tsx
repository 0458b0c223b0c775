'use client';

/**
 * Dataset figures: per-channel power, the covariance magnitude |R| as a
 * heatmap, and the covariance eigenvalues with the MDL and AIC source-count
 * choices. Chart definitions in lib/charts/dataset.ts.
 */
import { useMemo } from 'react';
import { Chart } from '@/components/charts/chart';
import { channelPowerOption, covarianceOption, eigenvalueOption, type EigenvalueInput } from '@/lib/charts';

export function ChannelPowerChart({
  powerDb,
  exportName = 'channel-power',
}: {
  powerDb: number[];
  exportName?: string;
}) {
  const option = useMemo(() => channelPowerOption(powerDb), [powerDb]);
  return (
    <figure>
      <Chart
        option={option}
        height={240}
        ariaLabel="Power per channel in dB"
        exportName={exportName}
        testIdPrefix="channel-power"
      />
      <figcaption className="mt-1 text-xs text-ink-500">
        Dashed line: the median channel. A bar more than 10 dB below it (coral) points at a dead or badly wired channel.
      </figcaption>
    </figure>
  );
}

export function CovarianceHeatmap({
  magnitude,
  exportName = 'covariance',
}: {
  magnitude: number[][];
  exportName?: string;
}) {
  const option = useMemo(() => covarianceOption(magnitude), [magnitude]);
  return (
    <figure className="max-w-md">
      <Chart
        option={option}
        height={360}
        ariaLabel="Covariance magnitude heatmap"
        exportName={exportName}
        testIdPrefix="covariance"
      />
      <figcaption className="mt-1 text-xs text-ink-500">
        |R[i,k]| scaled by the largest diagonal entry (square-root shading). A dark row and column with a pale diagonal
        cell is a dead channel; a row brighter off the diagonal than its neighbours suggests swapped or miswired leads.
      </figcaption>
    </figure>
  );
}

export function EigenvalueChart({ exportName = 'eigenvalues', ...input }: EigenvalueInput & { exportName?: string }) {
  const { eigenvalues, mdl, aic, mdlChoice, aicChoice, sourceCount } = input;
  const option = useMemo(
    () => eigenvalueOption({ eigenvalues, mdl, aic, mdlChoice, aicChoice, sourceCount }),
    [eigenvalues, mdl, aic, mdlChoice, aicChoice, sourceCount],
  );
  return (
    <figure>
      <Chart
        option={option}
        height={240}
        ariaLabel="Eigenvalues with the MDL and AIC choices"
        exportName={exportName}
        testIdPrefix="eigenvalues"
      />
      <figcaption className="mt-1 text-xs text-ink-500">
        Signal eigenvalues in teal. MDL picks <strong>{mdlChoice}</strong> source{mdlChoice === 1 ? '' : 's'} (dashed
        teal line), AIC picks <strong>{aicChoice}</strong>
        {aicChoice !== mdlChoice ? ' (dotted amber line)' : ''} — Wax &amp; Kailath (1985); MDL is the default rule.
        {sourceCount !== undefined && sourceCount !== mdlChoice ? ` The run used ${sourceCount}.` : ''}
      </figcaption>
    </figure>
  );
}
