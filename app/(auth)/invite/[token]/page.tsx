import type { Metadata } from "next";
import { ROLE_LABEL, ROLE_SUMMARY } from "@/lib/base/permissions";
import { describeInvitation } from "@/lib/services/members/describeInvitation";
import { systemContext } from "@/lib/services/system";
import { AcceptInviteForm } from "./accept-form";

export const metadata: Metadata = { title: "Join a lab" };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const invite = await describeInvitation({ ctx: systemContext("invitation link"), input: { token } });
  if (!invite) {
    return (
      <div className="w-full max-w-sm">
        <h1 className="text-2xl font-semibold">This invitation has expired or was used</h1>
        <p className="mt-2 text-sm text-ink-soft">Ask your lab owner to send a new one from the lab's settings.</p>
      </div>
    );
  }
  return (
    <div className="w-full max-w-sm">
      <p className="text-xs font-semibold uppercase tracking-[0.14em] text-copper">Invitation</p>
      <h1 className="mt-1 text-2xl font-semibold">Join {invite.labName}</h1>
      <p className="mt-2 text-sm text-ink-soft">
        as <strong>{ROLE_LABEL[invite.role]}</strong> — {ROLE_SUMMARY[invite.role]}
      </p>
      <p className="mt-1 text-sm text-ink-soft">
        Account: <span className="num">{invite.email}</span>
      </p>
      <div className="mt-8">
        <AcceptInviteForm token={token} existingAccount={invite.existingAccount} />
      </div>
    </div>
  );
}
