/** Brink's release version; kept equal to package.json's "version" (a test checks it). */
export const BRINK_VERSION = '0.1.0';
