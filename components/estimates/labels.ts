/** Display names of the estimation methods, keyed by the v1 API method id. */
export const METHOD_LABELS: Record<string, string> = {
  'esprit-ls': 'LS-ESPRIT',
  'esprit-tls': 'TLS-ESPRIT',
  'esprit-unitary': 'Unitary ESPRIT',
  'root-music': 'root-MUSIC',
  music: 'MUSIC',
  bartlett: 'Bartlett',
  mvdr: 'MVDR (Capon)',
};
