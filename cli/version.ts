// Kept in step with package.json by tests/cli.test.ts.
export const VERSION = '0.1.0';
