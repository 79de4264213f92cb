/**
 * Prints the one-time setup code for `/setup` while the installation has no lab of its own (any
 * lab but the demo lab): `setup code: XXXX-XXXX-XXXX-XXXX`. Each run issues a fresh code and the
 * unused older ones stop working; once a lab exists it prints `setup: done` and issues none.
 * Run by `npm start` on every start; elsewhere:
 *   node --conditions=react-server --import tsx scripts/setup-code.ts   (with DATABASE_URL set)
 */
import { issueSetupCode } from "../lib/services/labs/issueSetupCode";
import { closeSystemContext, systemContext } from "../lib/services/system";

async function main() {
  if (!process.env.DATABASE_URL) throw new Error("DATABASE_URL is not set");
  try {
    const { code } = await issueSetupCode({ ctx: systemContext("setup code") });
    console.log(code ? `setup code: ${code}` : "setup: done (a lab of your own exists; /setup is closed)");
  } finally {
    await closeSystemContext();
  }
}

main().catch((err) => {
  console.error(`setup-code: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
