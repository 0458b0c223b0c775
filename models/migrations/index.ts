import type { QueryInterface } from 'sequelize';
import * as m0001 from './0001-initial';
import * as m0002 from './0002-arrays-datasets-runs';
import * as m0003 from './0003-studies';
import * as m0004 from './0004-jobs';
import * as m0005 from './0005-calibrations';
import * as m0006 from './0006-bearing-time-records';
import * as m0007 from './0007-run-result-storage';

export type Migration = {
  name: string;
  up: (params: { context: QueryInterface }) => Promise<void>;
  down: (params: { context: QueryInterface }) => Promise<void>;
};

/**
 * Every migration, in order. Add a new file `NNNN-what.ts` exporting typed
 * `up`/`down` and append it here (an explicit list works the same under tsx,
 * vitest and the Next bundle, unlike a filesystem glob).
 */
export const migrations: Migration[] = [
  { name: '0001-initial', ...m0001 },
  { name: '0002-arrays-datasets-runs', ...m0002 },
  { name: '0003-studies', ...m0003 },
  { name: '0004-jobs', ...m0004 },
  { name: '0005-calibrations', ...m0005 },
  { name: '0006-bearing-time-records', ...m0006 },
  { name: '0007-run-result-storage', ...m0007 },
];
