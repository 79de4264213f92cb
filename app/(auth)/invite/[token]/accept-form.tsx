"use client";

import Link from "next/link";
import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/field";
import type { ActionState } from "@/lib/actions/types";
import { acceptInviteAction } from "../../actions";

export function AcceptInviteForm({ token, existingAccount }: { token: string; existingAccount: boolean }) {
  const [state, action, pending] = useActionState(acceptInviteAction.bind(null, token), { ok: false } as ActionState);
  if (state.ok && state.message) {
    return (
      <div className="space-y-4">
        <Notice tone="ok">{state.message}</Notice>
        <Link href="/sign-in" className="text-sm font-medium text-copper underline">
          Go to sign-in
        </Link>
      </div>
    );
  }
  return (
    <form action={action} className="space-y-4" data-testid="accept-invite-form">
      {state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      {existingAccount ? (
        <Notice>You already have a Bandcross account: enter your name and your current password to join.</Notice>
      ) : null}
      <Field label="Your name" name="name" error={state.fieldErrors?.name}>
        <Input name="name" autoComplete="name" required defaultValue={state.values?.name ?? ""} />
      </Field>
      <Field
        label={existingAccount ? "Your password" : "Choose a password"}
        name="password"
        hint="At least 10 characters."
        error={state.fieldErrors?.password}
      >
        <Input
          name="password"
          type="password"
          autoComplete={existingAccount ? "current-password" : "new-password"}
          required
          minLength={10}
        />
      </Field>
      <Button type="submit" className="w-full" disabled={pending}>
        {pending ? "Joining…" : "Join the lab"}
      </Button>
    </form>
  );
}
