/**
 * globalSetup of the api-pg project: one throwaway PostgreSQL cluster
 * (scripts/pg-cluster.ts, Debian's binaries) for the run; every test file then
 * creates its own database on it (tests/helpers/api-setup.ts).
 */
import { startPgCluster, type PgCluster } from '../../scripts/pg-cluster';

let cluster: PgCluster | undefined;

export default async function setup(): Promise<() => Promise<void>> {
  cluster = await startPgCluster({ database: 'steerwise_template' });
  process.env.STEERWISE_TEST_PG_URL = cluster.url;
  return async () => {
    await cluster?.stop();
  };
}
