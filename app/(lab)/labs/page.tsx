import Link from "next/link";
import { redirect } from "next/navigation";
import { BrandMark } from "@/components/brand";
import { EmptyState } from "@/components/ui/card";
import { auth } from "@/lib/auth";
import { ROLE_LABEL } from "@/lib/base/permissions";

export default async function LabsPage() {
  const session = await auth();
  const labs = session?.user?.labs ?? [];
  if (labs.length === 1) redirect(`/labs/${labs[0].slug}`);
  return (
    <main className="mx-auto max-w-xl px-6 py-16">
      <BrandMark />
      <h1 className="mt-10 text-2xl font-semibold">Choose a lab</h1>
      <div className="mt-6 space-y-3">
        {labs.length === 0 ? (
          <EmptyState title="You are not a member of any lab yet">
            Ask a lab owner to invite you; the link arrives by e-mail.
          </EmptyState>
        ) : (
          labs.map((l) => (
            <Link
              key={l.id}
              href={`/labs/${l.slug}`}
              className={
                "flex items-center justify-between rounded-lg border " +
                "border-line bg-card px-5 py-4 hover:border-ink-soft"
              }
            >
              <span className="font-medium">{l.name}</span>
              <span className="text-xs text-muted">{ROLE_LABEL[l.role]}</span>
            </Link>
          ))
        )}
      </div>
    </main>
  );
}
