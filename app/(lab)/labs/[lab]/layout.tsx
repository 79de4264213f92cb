import { LabNav } from "@/components/lab/lab-nav";
import { pageCtx } from "@/lib/actions/validated";
import { auth } from "@/lib/auth";
import { can } from "@/lib/base/permissions";
import { unreadCount } from "@/lib/services/alerts/unreadCount";
import { signOutAction } from "../../../(auth)/actions";

export default async function LabLayout({
  children,
  params,
}: {
  children: React.ReactNode;
  params: Promise<{ lab: string }>;
}) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const session = await auth();
  const { actor } = ctx;
  const unread = await unreadCount({ ctx });
  return (
    <div
      className={
        "min-h-screen lg:grid lg:grid-cols-[232px_minmax(0,1fr)] " +
        "lg:bg-[linear-gradient(to_right,var(--color-night)_232px,transparent_232px)]"
      }
    >
      <LabNav
        lab={{ slug: actor.labSlug, name: actor.labName }}
        user={{ name: actor.name, email: actor.email, role: actor.role }}
        labs={(session?.user?.labs ?? []).map((l) => ({ slug: l.slug, name: l.name }))}
        canConfigure={can(actor.role, "members:manage")}
        signOut={signOutAction}
        unreadCount={unread}
      />
      <main id="main" className="min-w-0 px-5 py-8 sm:px-8 lg:px-10">
        <div className="mx-auto max-w-6xl">{children}</div>
      </main>
    </div>
  );
}
