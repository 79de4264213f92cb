/**
 * A database of its own in the test stack's PostgreSQL, migrated and empty: for what holds only
 * while an installation has no lab of its own (setup), which the shared test database never is.
 */
import { randomUUID } from "node:crypto";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Pool } from "pg";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";

export interface FreshDatabase {
  url: string;
  db: Db;
  drop(): Promise<void>;
}

export async function freshDatabase(): Promise<FreshDatabase> {
  const base = process.env.DATABASE_URL;
  if (!base) throw new Error("DATABASE_URL is not set: run the tests with npm test");
  const name = `bandcross_fresh_${randomUUID().slice(0, 8)}`;
  const admin = new Pool({ connectionString: base, max: 1 });
  await admin.query(`create database ${name}`);
  const url = new URL(base);
  url.pathname = `/${name}`;
  const pool = new Pool({ connectionString: url.toString(), max: 4 });
  // Dropping the database ends its connections; a client still closing hears of it, harmlessly.
  pool.on("error", () => {});
  const db = drizzle(pool, { schema });
  await migrate(db, { migrationsFolder: path.resolve("drizzle") });
  return {
    url: url.toString(),
    db,
    async drop() {
      await pool.end();
      await admin.query(`drop database if exists ${name} with (force)`);
      await admin.end();
    },
  };
}
