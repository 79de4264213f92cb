"use client";

import { useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { ActionState } from "@/lib/actions/types";
import { unsubscribeAction } from "./actions";

export function ConfirmUnsubscribe({ token, sampleName }: { token: string; sampleName: string }) {
  const [state, setState] = useState<ActionState | null>(null);
  const [pending, start] = useTransition();
  if (state?.ok) return <Notice tone="ok">{state.message}</Notice>;
  return (
    <div className="space-y-4">
      {state?.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <Button
        type="button"
        className="w-full"
        data-testid="confirm-unsubscribe"
        disabled={pending}
        onClick={() => start(async () => setState(await unsubscribeAction(token)))}
      >
        {pending ? "Stopping…" : `Stop e-mails about ${sampleName}`}
      </Button>
    </div>
  );
}
