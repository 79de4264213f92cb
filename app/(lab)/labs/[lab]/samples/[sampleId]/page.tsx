import Link from "next/link";
import { ButtonLink } from "@/components/ui/button";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/auth/permissions";
import { getSample } from "@/lib/services/samples/getSample";
import { listSessions } from "@/lib/services/sessions/sessions";

export default async function SamplePage({ params }: { params: Promise<{ lab: string; sampleId: string }> }) {
  const { lab, sampleId } = await params;
  const ctx = await pageCtx(lab);
  const s = await orNotFound(getSample({ ctx, input: { id: sampleId } }));
  const sessions = await listSessions({ ctx, input: { sampleId: s.id } });
  return (
    <>
      <PageHeader
        eyebrow="Sample"
        title={s.name}
        description={`${s.material}${s.substrate ? ` on ${s.substrate}` : ""}`}
        actions={
          <>
            {can(ctx.actor.role, "session:write") ? <ButtonLink href={`/labs/${lab}/sessions/new?sample=${s.id}`} variant="secondary">New session</ButtonLink> : null}
            {can(ctx.actor.role, "sample:write") ? <ButtonLink href={`/labs/${lab}/samples/${s.id}/edit`} variant="secondary">Edit</ButtonLink> : null}
          </>
        }
      />
      <div className="grid gap-5 lg:grid-cols-[2fr_1fr]">
        <Card title="Sessions">
          {sessions.length === 0 ? (
            <EmptyState title="No sessions for this sample">Create a session for each cooldown or tip, then upload its spectra.</EmptyState>
          ) : (
            <ul className="divide-y divide-line">
              {sessions.map((x) => (
                <li key={x.id} className="flex items-center justify-between py-2.5">
                  <Link className="font-medium hover:underline" href={`/labs/${lab}/sessions/${x.id}`}>
                    {x.label}
                  </Link>
                  <span className="num text-xs text-muted">
                    {x.date} · {x.spectraCount} spectra
                  </span>
                </li>
              ))}
            </ul>
          )}
        </Card>
        <Card title="Sample">
          <dl className="space-y-2 text-sm">
            <div className="flex justify-between gap-4">
              <dt className="text-muted">Work function</dt>
              <dd className="num">
                {s.workFunctionEv.toFixed(2)} ± {s.workFunctionSigmaEv.toFixed(2)} eV
              </dd>
            </div>
            {s.notes ? <p className="whitespace-pre-wrap pt-2 text-ink-soft">{s.notes}</p> : null}
          </dl>
        </Card>
      </div>
    </>
  );
}
