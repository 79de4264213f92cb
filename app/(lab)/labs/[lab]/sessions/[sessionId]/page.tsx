import Link from "next/link";
import { ButtonLink } from "@/components/ui/button";
import { Card, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/auth/permissions";
import { getSession } from "@/lib/services/sessions/sessions";

export default async function SessionPage({ params }: { params: Promise<{ lab: string; sessionId: string }> }) {
  const { lab, sessionId } = await params;
  const ctx = await pageCtx(lab);
  const { session: s, sampleName, tipLabel, operatorName } = await orNotFound(getSession({ ctx, input: { id: sessionId } }));
  return (
    <>
      <PageHeader
        eyebrow="Session"
        title={s.label}
        description={
          <>
            <Link className="underline-offset-2 hover:underline" href={`/labs/${lab}/samples/${s.sampleId}`}>
              {sampleName}
            </Link>{" "}
            · <span className="num">{s.date}</span>
            {tipLabel ? ` · tip ${tipLabel}` : ""}
            {s.temperatureK != null ? ` · ${s.temperatureK} K` : ""}
            {operatorName ? ` · ${operatorName}` : ""}
          </>
        }
        actions={can(ctx.actor.role, "session:write") ? <ButtonLink variant="secondary" href={`/labs/${lab}/sessions/${s.id}/edit`}>Edit</ButtonLink> : null}
      />
      <Card title="Spectra">
        <p className="text-sm text-ink-soft">Spectra of this session appear here once uploaded.</p>
      </Card>
    </>
  );
}
