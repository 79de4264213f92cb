/**
 * Applies the committed migrations in drizzle/ to DATABASE_URL. Run by `npm start` and `npm test`;
 * safe to run again (drizzle records what it applied). Migrations are generated with
 * `npm run db:generate` and committed; nothing creates tables at request time.
 */
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Pool } from "pg";

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error("migrate: DATABASE_URL is not set");
    process.exit(1);
  }
  const pool = new Pool({ connectionString: url, max: 1 });
  try {
    const started = Date.now();
    await migrate(drizzle(pool), { migrationsFolder: new URL("../drizzle", import.meta.url).pathname });
    console.log(`migrate: database is up to date (${Date.now() - started} ms)`);
  } finally {
    await pool.end();
  }
}

main().catch((err) => {
  console.error(`migrate: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
