import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { newLabDefaultValues, newLabFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { createLabAction } from "../actions";

export const metadata: Metadata = { title: "New lab" };

/** The lab switcher's "New lab": a lab of one's own, with its defaults; its creator is its owner. */
export default async function NewLabPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "lab:create")) notFound();
  return (
    <>
      <PageHeader
        eyebrow="Labs"
        title="New lab"
        description={`You will be its owner; ${ctx.actor.labName} and your role there stay as they are.`}
      />
      <Card>
        <EntityForm
          action={createLabAction.bind(null, lab)}
          schema="newLab"
          submitLabel="Create lab"
          testId="new-lab-form"
          fields={newLabFields(newLabDefaultValues())}
        />
      </Card>
    </>
  );
}
