import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { Notice } from "@/components/ui/card";
import { auth } from "@/lib/auth";
import { checkRequestHost, untrustedHostMessage } from "@/lib/auth/here";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string }> }) {
  const session = await auth();
  if (session?.user?.id) redirect("/labs");
  const { next } = await searchParams;
  const host = await checkRequestHost();
  return (
    <div className="w-full max-w-sm">
      <h1 className="text-2xl font-semibold tracking-tight">Sign in to Bandcross</h1>
      <p className="mt-1 text-sm text-ink-soft">Use the e-mail address your lab owner invited.</p>
      {host.trusted ? null : (
        <div className="mt-6" data-testid="untrusted-host">
          <Notice tone="danger">{untrustedHostMessage(host)}</Notice>
        </div>
      )}
      <div className="mt-8">
        <SignInForm next={next} />
      </div>
      <p className="mt-8 text-xs text-muted">
        No account? Bandcross is invitation-only: ask your lab owner to invite you from the lab's settings.
      </p>
    </div>
  );
}
