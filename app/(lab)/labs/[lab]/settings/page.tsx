import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { labFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can, ROLE_LABEL, ROLES } from "@/lib/base/permissions";
import { getLab } from "@/lib/services/labs/getLab";
import { listMembers } from "@/lib/services/members/listMembers";
import { listSampleAccess } from "@/lib/services/members/listSampleAccess";
import { listSamples } from "@/lib/services/samples/listSamples";
import { listTokens } from "@/lib/services/tokens/listTokens";
import { inviteAction, setFlaggedInFitAction, updateLabDefaultsAction } from "../actions";
import { MembersPanel, TokensPanel } from "./panels";

export const metadata: Metadata = { title: "Lab settings" };

export default async function SettingsPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "members:manage")) notFound();
  const [labRow, members, tokens, access, samples] = await Promise.all([
    getLab({ ctx }),
    listMembers({ ctx }),
    listTokens({ ctx }),
    listSampleAccess({ ctx }),
    listSamples({ ctx }),
  ]);
  const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABEL[r] }));
  return (
    <>
      <PageHeader
        eyebrow={ctx.actor.labName}
        title="Lab settings"
        description={
          "Members and their roles, API tokens for the acquisition PC, the lab's " +
          "default work functions, and how flagged spectra enter the fit."
        }
      />
      <div className="space-y-6">
        <Card title="Members">
          <MembersPanel
            lab={lab}
            selfUserId={ctx.actor.userId}
            samples={samples.map((x) => ({ id: x.id, name: x.name }))}
            access={access}
            members={members.members.map((m) => ({ ...m, since: m.since.toISOString() }))}
            pending={members.pending.map((p) => ({
              ...p,
              expiresAt: p.expiresAt.toISOString(),
              createdAt: p.createdAt.toISOString(),
            }))}
          />
          <div className="mt-6 border-t border-line pt-5">
            <h3 className="mb-3 text-sm font-semibold">Invite someone</h3>
            <EntityForm
              action={inviteAction.bind(null, lab)}
              schema="invite"
              submitLabel="Send invitation"
              testId="invite-form"
              resetOnSuccess
              onSuccessMessage="Invitation sent. The link works once and expires in 7 days."
              fields={[
                { name: "email", label: "E-mail", type: "email", placeholder: "name@institute.example" },
                { name: "role", label: "Role", type: "select", options: roleOptions, defaultValue: "analyst" },
              ]}
            />
          </div>
        </Card>
        <Card title="API tokens">
          <TokensPanel
            lab={lab}
            members={members.members.map((m) => ({ userId: m.userId, name: m.name }))}
            meId={ctx.actor.userId}
            tokens={tokens.map((t) => ({
              ...t,
              createdAt: t.createdAt.toISOString(),
              lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
              revokedAt: t.revokedAt?.toISOString() ?? null,
            }))}
          />
        </Card>
        <Card title="Lab defaults">
          <p className="mb-4 text-sm text-ink-soft">
            New tips and samples start with these work functions; each tip and sample can then set its own.
          </p>
          <EntityForm
            action={updateLabDefaultsAction.bind(null, lab)}
            schema="labDefaults"
            submitLabel="Save defaults"
            testId="lab-defaults-form"
            onSuccessMessage="Saved."
            fields={labFields({
              name: labRow.name,
              defaultTipWorkFunction_eV: String(labRow.defaultTipWorkFunctionEv),
              defaultTipWorkFunctionSigma_eV: String(labRow.defaultTipWorkFunctionSigmaEv),
              defaultSampleWorkFunction_eV: String(labRow.defaultSampleWorkFunctionEv),
              defaultSampleWorkFunctionSigma_eV: String(labRow.defaultSampleWorkFunctionSigmaEv),
            })}
          />
        </Card>
        <Card title="Flagged spectra in the critical-field fit">
          <p className="mb-4 text-sm text-ink-soft">
            A quality flag says why an automatic pick may not be trusted (a glitch removed, a sloped background, a noisy
            onset…). Flagged spectra can enter the fit, marked on the phase plot, or be left out of it. Picks an analyst
            corrected always enter. Changing this refits every sample of the lab in the background.
          </p>
          <EntityForm
            action={setFlaggedInFitAction.bind(null, lab)}
            schema="flaggedInFit"
            submitLabel="Save"
            testId="flagged-in-fit-form"
            onSuccessMessage="Saved. Every sample is being refitted in the background."
            fields={[
              {
                name: "flaggedInFit",
                label: "Flagged spectra",
                type: "select",
                defaultValue: labRow.flaggedInFit,
                options: [
                  { value: "include", label: "Include them in the fit (marked on the plot)" },
                  { value: "exclude", label: "Leave them out of the fit (unless corrected)" },
                ],
                wide: true,
              },
            ]}
          />
        </Card>
      </div>
    </>
  );
}
