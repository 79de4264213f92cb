import { GettingStarted } from "@/components/lab/getting-started";
import type { Ctx } from "@/lib/base/context";
import { can } from "@/lib/base/permissions";
import { getStartSteps } from "@/lib/services/labs/getStartSteps";

/** A new lab's first steps (lab home, tips, sessions) until its first file is uploaded; nothing after. */
export async function LabStart({ ctx, lab }: { ctx: Ctx; lab: string }) {
  const steps = await getStartSteps({ ctx });
  if (steps.allDone) return null;
  const role = ctx.actor.role;
  const may = {
    tip: can(role, "tip:write"),
    sample: can(role, "sample:write"),
    session: can(role, "session:write"),
    upload: can(role, "upload:write"),
  };
  return <GettingStarted lab={lab} steps={steps} may={may} />;
}
