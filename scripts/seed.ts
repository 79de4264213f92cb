/**
 * Seeds the demo lab once (lib/services/demo): the lab, its people and samples, then its spectrum
 * files through the real upload path (the worker processes them once it starts). Running it again
 * changes nothing. `BANDCROSS_DEMO_SPECTRA=0` leaves the files out.
 */
import { DEMO_LAB, seedDemoLab } from "../lib/services/demo/seedDemoLab";
import { seedDemoSpectra } from "../lib/services/demo/seedDemoSpectra";
import { stopBoss } from "../lib/jobs/queue";
import { closeSystemContext, systemContext } from "../lib/services/system";

async function main() {
  if (!process.env.DATABASE_URL) throw new Error("DATABASE_URL is not set");
  const ctx = systemContext("seed");
  try {
    const result = await seedDemoLab({ ctx });
    console.log(result.created ? "seed: demo lab created (slug demo)" : "seed: demo lab already present, nothing changed");
    if (result.created && process.env.BANDCROSS_DEMO_SPECTRA !== "0") {
      const n = await seedDemoSpectra({ ctx, input: { labSlug: DEMO_LAB.slug } });
      console.log(`seed: ${n} demo spectrum files uploaded and queued`);
    }
  } finally {
    await stopBoss();
    await closeSystemContext();
  }
}

main().catch((err) => {
  console.error(`seed: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
