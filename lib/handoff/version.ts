import pkg from '@/package.json';

/** The software version written into bundles and compared on import: "steerwise <package version>". */
export const SOFTWARE_VERSION = `steerwise ${(pkg as { version: string }).version}`;
