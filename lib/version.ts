import packageJson from '@/package.json';

/**
 * The software version stored with every estimate run and study and written
 * into hand-off bundles: package.json's version, e.g. "0.1.0".
 */
export const SOFTWARE_VERSION: string = packageJson.version;
