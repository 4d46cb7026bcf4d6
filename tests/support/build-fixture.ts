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

/**
 * A recording uploaded by the demo builder, on no build, made straight in the database; its
 * processing "failed" so that its page needs no media file. Returns its id.
 */
export async function makeRecording(title: string) {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    const { rows } = await client.query(
      `insert into recordings (title, original_name, original_size, state, state_reason, uploaded_by) values ($1, 'deck.mp4', 1, 'failed', 'Browser test fixture', 'demo-marcus') returning id`,
      [title],
    );
    return rows[0].id as string;
  } finally {
    await client.end();
  }
}
