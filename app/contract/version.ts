/** The software version recorded in every run and record. Kept in step with package.json by a test. */
export const SOFTWARE_VERSION = '0.1.0';
