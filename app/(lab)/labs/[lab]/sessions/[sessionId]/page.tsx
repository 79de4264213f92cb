import { SpectraTable } from "@/components/uploads/spectra-table";
import { UploadPanel } from "@/components/uploads/upload-panel";
import { ButtonLink } from "@/components/ui/button";
import { Card, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { getSession } from "@/lib/services/sessions/getSession";
import { listTips } from "@/lib/services/tips/listTips";
import { listSessionUploads } from "@/lib/services/uploads/listSessionUploads";
import { SessionLine } from "./session-line";

export default async function SessionPage({ params }: { params: Promise<{ lab: string; sessionId: string }> }) {
  const { lab, sessionId } = await params;
  const ctx = await pageCtx(lab);
  const {
    session: s,
    sampleName,
    tipLabel,
    operatorName,
  } = await orNotFound(getSession({ ctx, input: { id: sessionId } }));
  const [uploads, tips] = await Promise.all([
    listSessionUploads({ ctx, input: { sessionId: s.id } }),
    listTips({ ctx }),
  ]);
  const canUpload = can(ctx.actor.role, "upload:write");
  const curves = uploads.reduce((n, u) => n + u.curvesCount, 0);
  return (
    <>
      <PageHeader
        eyebrow="Session"
        title={s.label}
        description={
          <SessionLine
            lab={lab}
            sampleId={s.sampleId}
            sampleName={sampleName}
            date={s.date}
            tipLabel={tipLabel}
            temperatureK={s.temperatureK}
            operatorName={operatorName}
          />
        }
        actions={
          <>
            <ButtonLink variant="secondary" href={`/labs/${lab}/samples/${s.sampleId}`}>
              Phase plot
            </ButtonLink>
            <ButtonLink variant="secondary" href={`/labs/${lab}/sessions/${s.id}/barrier`}>
              I(z) curves{curves ? ` (${curves})` : ""}
            </ButtonLink>
            {can(ctx.actor.role, "session:write") ? (
              <ButtonLink variant="secondary" href={`/labs/${lab}/sessions/${s.id}/edit`}>
                Edit
              </ButtonLink>
            ) : null}
          </>
        }
      />
      <div className="space-y-6">
        <Card title="Upload">
          <UploadPanel lab={lab} sessionId={s.id} canUpload={canUpload} initial={uploads} />
          {canUpload ? (
            <p className="mt-3 text-xs text-muted">
              From the acquisition PC:{" "}
              <code className="num">
                npm run --silent bandcross -- push DIR --session {s.id} --url{" "}
                {process.env.APP_URL ?? "http://localhost:3000"}
              </code>{" "}
              with an API token in <code className="num">BANDCROSS_TOKEN</code>.
            </p>
          ) : null}
        </Card>
        <Card title="Spectra">
          <SpectraTable
            lab={lab}
            sessionId={s.id}
            sampleId={s.sampleId}
            canEdit={can(ctx.actor.role, "spectrum:tag")}
            tips={tips.map((t) => ({ id: t.id, label: t.label }))}
          />
        </Card>
      </div>
    </>
  );
}
