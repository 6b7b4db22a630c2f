// The engine version recorded in every run.json. Kept in sync with package.json by a test.
export const ENGINE_VERSION = '0.1.0';
