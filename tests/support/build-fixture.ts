import pg from "pg";

/**
 * A build for a browser test to file its test records against (since issue 16 a record is
 * attached to a build by choosing it), made straight in the database. Returns its number.
 */
export async function makeBuild(
  number = `BRW-${String(10 + Math.floor(Math.random() * 89))}-${10_000 + Math.floor(Math.random() * 89_999)}`,
) {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query(
      `insert into builds (number, customer_name, engine, engine_serial) values ($1, 'Browser test customer', 'Inline four, 2.0 L', 'E2E-1') on conflict (number) do nothing`,
      [number],
    );
    return number;
  } finally {
    await client.end();
  }
}
