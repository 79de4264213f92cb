import "server-only";
import { closeDb, db } from "@/db/client";
import type { Faults, SystemCtx } from "@/lib/base/context";

/**
 * The context of work no signed-in person asks for (lib/base/context.ts `SystemCtx`): the worker's
 * jobs, links that are their own credential, the seed, the command line's `token create` and
 * `lab create`, `/setup`. Callers above the services get their database through this, never from
 * `db/client` themselves.
 */
export function systemContext(task: string, faults?: Faults): SystemCtx {
  return { db: db(), task, ...(faults && { faults }) };
}

/** Closes this process's database pool: for processes that end after their work (worker, seed, command line). */
export const closeSystemContext = closeDb;
