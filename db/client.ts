import "server-only";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;
/** A transaction handle has the same query API as the database. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

const globalForDb = globalThis as unknown as { bandcrossPool?: Pool; bandcrossDb?: Db };

/**
 * One pool per process (kept on globalThis so dev reloads do not leak pools). The pool size is
 * modest: several app and worker processes share one PostgreSQL.
 */
export function db(): Db {
  if (!globalForDb.bandcrossDb) {
    const pool = new Pool({ connectionString: env().DATABASE_URL, max: Number(process.env.DB_POOL_MAX ?? 10) });
    globalForDb.bandcrossPool = pool;
    globalForDb.bandcrossDb = drizzle(pool, { schema });
  }
  return globalForDb.bandcrossDb;
}

export async function closeDb(): Promise<void> {
  await globalForDb.bandcrossPool?.end();
  globalForDb.bandcrossPool = undefined;
  globalForDb.bandcrossDb = undefined;
}

export { schema };
