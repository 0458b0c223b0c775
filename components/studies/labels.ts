export { METHOD_LABELS } from '@/components/estimates/labels';

export const VARIABLE_LABELS: Record<string, { name: string; unit: string; axis: string }> = {
  snr: { name: 'SNR', unit: 'dB', axis: 'SNR per element of source 1 (dB, log scale in linear SNR)' },
  snapshots: { name: 'Snapshots N', unit: '', axis: 'snapshots N (log scale)' },
  elements: { name: 'Elements M', unit: '', axis: 'elements M (log scale)' },
};
