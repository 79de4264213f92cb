import type { Metadata } from "next";
import { ButtonLink } from "@/components/ui/button";
import { PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { listTipKappas } from "@/lib/services/curves/listTipKappas";
import { listTips } from "@/lib/services/tips/listTips";
import { TipsTable } from "./tips-table";
import { LabStart } from "../lab-start";

export const metadata: Metadata = { title: "Tips" };

export default async function TipsPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const [rows, kappas] = await Promise.all([listTips({ ctx }), listTipKappas({ ctx })]);
  const canWrite = can(ctx.actor.role, "tip:write");
  return (
    <>
      <PageHeader
        eyebrow={ctx.actor.labName}
        title="Tips"
        description={
          "Probes and their work functions: the tip–sample " + "work-function difference drives the junction field."
        }
        actions={canWrite ? <ButtonLink href={`/labs/${lab}/tips/new`}>New tip</ButtonLink> : null}
      />
      <LabStart ctx={ctx} lab={lab} />
      <TipsTable
        lab={lab}
        canWrite={canWrite}
        tips={rows.map((t) => ({
          id: t.id,
          label: t.label,
          material: t.material,
          workFunctionEv: t.workFunctionEv,
          workFunctionSigmaEv: t.workFunctionSigmaEv,
          preparedOn: t.preparedOn,
          kappas: kappas
            .filter((k) => k.tipId === t.id)
            .map((k) => `${k.sample}: κ = ${k.kappa_per_nm.toFixed(2)} ± ${k.kappaSigma_per_nm.toFixed(2)} nm⁻¹, φap = ${k.barrierHeight_eV.toFixed(2)} eV (${k.curves} I(z))`),
        }))}
      />
    </>
  );
}
