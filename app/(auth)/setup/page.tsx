import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { newLabDefaultValues, setupFields } from "@/components/forms/specs";
import { getSetupState } from "@/lib/services/labs/getSetupState";
import { systemContext } from "@/lib/services/system";
import { setUpAction } from "../actions";

export const metadata: Metadata = { title: "Set up your lab" };
// Open or closed is read from the database on every request, never at build time.
export const dynamic = "force-dynamic";

/**
 * The group's first own lab and owner. Open until a lab other than the demo lab exists; then a
 * 404 response (the layout streams nothing before this page, so the status is a real 404).
 */
export default async function SetupPage() {
  const { open } = await getSetupState({ ctx: systemContext("setup page") });
  if (!open) notFound();
  return (
    <div className="w-full max-w-xl" data-testid="setup-page">
      <p className="text-xs font-semibold uppercase tracking-[0.14em] text-copper">First start</p>
      <h1 className="mt-1 text-2xl font-semibold tracking-tight">Set up your group's lab</h1>
      <p className="mt-2 text-sm text-ink-soft">
        Name the lab, give the work functions its new tips and samples start with, and create its first owner: you. Then
        invite your group from the lab's settings.
      </p>
      <div className="mt-8">
        <EntityForm
          action={setUpAction}
          schema="setup"
          submitLabel="Create the lab"
          testId="setup-form"
          fields={setupFields(newLabDefaultValues())}
        />
      </div>
    </div>
  );
}
