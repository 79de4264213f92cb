"use client";

import { useActionState, useState, type FormEvent } from "react";
import { useFormStatus } from "react-dom";
import type { z } from "zod";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select, Textarea } from "@/components/ui/field";
import type { ActionState } from "@/lib/actions/types";
import {
  fieldErrorsOf,
  flaggedInFitInput,
  inviteInput,
  labDefaultsInput,
  newLabInput,
  sampleInput,
  sessionInput,
  setupInput,
  tipInput,
  tokenInput,
} from "@/lib/schemas/lab";

/** The schemas a form may validate with in the browser: the same ones the server applies. */
const SCHEMAS = {
  sample: sampleInput,
  tip: tipInput,
  session: sessionInput,
  invite: inviteInput,
  labDefaults: labDefaultsInput,
  newLab: newLabInput,
  setup: setupInput,
  flaggedInFit: flaggedInFitInput,
  token: tokenInput,
} satisfies Record<string, z.ZodType>;

export type FieldSpec = {
  name: string;
  label: string;
  type?: "text" | "number" | "date" | "email" | "password" | "select" | "textarea";
  unit?: string;
  hint?: string;
  step?: string;
  placeholder?: string;
  required?: boolean;
  options?: { value: string; label: string }[];
  defaultValue?: string;
  wide?: boolean;
};

function Submit({ label }: { label: string }) {
  const { pending } = useFormStatus();
  return (
    <Button type="submit" disabled={pending} aria-busy={pending}>
      {pending ? "Saving…" : label}
    </Button>
  );
}

/**
 * A form bound to a server action. It validates with the same zod schema in the browser first
 * (instant field errors), then the server validates again and may add its own errors.
 */
export function EntityForm({
  action,
  schema,
  fields,
  submitLabel,
  testId,
  resetOnSuccess = false,
  onSuccessMessage,
}: {
  action: (state: ActionState, formData: FormData) => Promise<ActionState>;
  schema: keyof typeof SCHEMAS;
  fields: FieldSpec[];
  submitLabel: string;
  testId?: string;
  resetOnSuccess?: boolean;
  onSuccessMessage?: string;
}) {
  const [state, formAction] = useActionState(action, { ok: false } as ActionState);
  const [clientErrors, setClientErrors] = useState<Record<string, string[]>>({});
  const errors = { ...(state.fieldErrors ?? {}), ...clientErrors };

  function onSubmit(e: FormEvent<HTMLFormElement>) {
    const data = Object.fromEntries(new FormData(e.currentTarget).entries());
    const parsed = SCHEMAS[schema].safeParse(data);
    if (!parsed.success) {
      e.preventDefault();
      setClientErrors(fieldErrorsOf(parsed.error));
    } else {
      setClientErrors({});
    }
  }

  return (
    <form
      action={formAction}
      onSubmit={onSubmit}
      noValidate
      className="space-y-5"
      data-testid={testId}
      key={resetOnSuccess && state.ok ? String(Math.random()) : "form"}
    >
      {state.message && !state.ok ? <Notice tone="danger">{state.message}</Notice> : null}
      {state.ok && onSuccessMessage ? <Notice tone="ok">{onSuccessMessage}</Notice> : null}
      <div className="grid gap-4 sm:grid-cols-2">
        {fields.map((f) => {
          const value = state.values?.[f.name] ?? f.defaultValue ?? "";
          const err = errors[f.name];
          return (
            <div key={f.name} className={f.wide || f.type === "textarea" ? "sm:col-span-2" : ""}>
              <Field label={f.label} name={f.name} hint={f.hint} error={err} unit={f.unit}>
                {f.type === "select" ? (
                  // Keyed by the value it starts from: a select keeps its first default, so a saved
                  // value coming back with the revalidated page would not show (nor survive the
                  // form's reset after the action) without a fresh element.
                  <Select key={value} name={f.name} defaultValue={value} error={err}>
                    {f.options?.map((o) => (
                      <option key={o.value} value={o.value}>
                        {o.label}
                      </option>
                    ))}
                  </Select>
                ) : f.type === "textarea" ? (
                  <Textarea name={f.name} defaultValue={value} error={err} placeholder={f.placeholder} />
                ) : (
                  <Input
                    name={f.name}
                    type={f.type === "number" ? "text" : (f.type ?? "text")}
                    inputMode={f.type === "number" ? "decimal" : undefined}
                    defaultValue={value}
                    error={err}
                    placeholder={f.placeholder}
                    autoComplete={f.type === "password" ? "new-password" : undefined}
                    required={f.required}
                    className={f.type === "number" ? "num" : ""}
                  />
                )}
              </Field>
            </div>
          );
        })}
      </div>
      <div className="flex justify-end gap-2">
        <Submit label={submitLabel} />
      </div>
    </form>
  );
}
