// Types for the parts of stack.mjs that TypeScript code imports (the integration test that
// stops the test run's PostgreSQL, tests/integration/database-down.test.ts).
export function startPostgres(dir: string, port: number): Promise<void>;
export function stopPostgres(dir: string): void;
