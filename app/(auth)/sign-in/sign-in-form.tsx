"use client";

import { useActionState } from "react";
import { useFormStatus } from "react-dom";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/field";
import type { ActionState } from "@/lib/actions/types";
import { signInAction } from "../actions";

function Submit() {
  const { pending } = useFormStatus();
  return (
    <Button type="submit" className="w-full" disabled={pending} data-testid="sign-in-submit">
      {pending ? "Signing in…" : "Sign in"}
    </Button>
  );
}

export function SignInForm({ next }: { next?: string }) {
  const [state, action] = useActionState(signInAction, { ok: false } as ActionState);
  return (
    <form action={action} className="space-y-4" data-testid="sign-in-form">
      {state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <input type="hidden" name="next" value={next ?? ""} />
      <Field label="E-mail" name="email">
        <Input
          name="email"
          type="email"
          autoComplete="username"
          required
          defaultValue={state.values?.email ?? ""}
          autoFocus
        />
      </Field>
      <Field label="Password" name="password">
        <Input name="password" type="password" autoComplete="current-password" required />
      </Field>
      <Submit />
    </form>
  );
}
