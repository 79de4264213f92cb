import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { Notice } from "@/components/ui/card";
import { auth } from "@/lib/auth";
import { checkRequestHost, untrustedHostMessage } from "@/lib/auth/here";
import { getSetupState } from "@/lib/services/labs/getSetupState";
import { systemContext } from "@/lib/services/system";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string }> }) {
  const session = await auth();
  if (session?.user?.id) redirect("/labs");
  const { next } = await searchParams;
  const host = await checkRequestHost();
  // Until the group has a lab of its own (any but the demo lab), the way to make one.
  const setup = await getSetupState({ ctx: systemContext("sign-in page") });
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
      {setup.open ? (
        <div className="mt-8 rounded-lg border border-line bg-card px-4 py-3 text-sm" data-testid="setup-link">
          <p className="font-medium">New installation?</p>
          <p className="mt-0.5 text-ink-soft">
            <Link href="/setup" className="font-medium text-copper underline">
              Set up your group's lab
            </Link>{" "}
            with the setup code from the server's start log.
          </p>
        </div>
      ) : null}
      <p className="mt-8 text-xs text-muted">
        No account? Bandcross is invitation-only: ask your lab owner to invite you from the lab's settings.
      </p>
    </div>
  );
}
