import type { Metadata } from "next";
import { ButtonLink } from "@/components/ui/button";
import { PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { listSessions } from "@/lib/services/sessions/listSessions";
import { SessionsTable } from "./sessions-table";
import { LabStart } from "../lab-start";

export const metadata: Metadata = { title: "Sessions" };

export default async function SessionsPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const rows = await listSessions({ ctx });
  const canWrite = can(ctx.actor.role, "session:write");
  return (
    <>
      <PageHeader
        eyebrow={ctx.actor.labName}
        title="Sessions"
        description="One row per measurement session at the instrument: its sample, tip, temperature and spectra."
        actions={canWrite ? <ButtonLink href={`/labs/${lab}/sessions/new`}>New session</ButtonLink> : null}
      />
      <LabStart ctx={ctx} lab={lab} />
      <SessionsTable lab={lab} sessions={rows.map((r) => ({ ...r, temperatureK: r.temperatureK ?? null }))} />
    </>
  );
}
