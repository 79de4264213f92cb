import "server-only";
import type { DbOrTx } from "@/db/client";
import { apiTokens } from "@/db/schema";
import { newSecret, sha256Hex } from "@/lib/auth/secrets";

export async function insertToken(db: DbOrTx, labId: string, userId: string, name: string, createdBy: string | null) {
  const token = newSecret("bxt", 32);
  const [row] = await db
    .insert(apiTokens)
    .values({ labId, userId, name, tokenHash: sha256Hex(token), prefix: token.slice(0, 10), createdBy })
    .returning({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, createdAt: apiTokens.createdAt });
  return { token, row };
}
