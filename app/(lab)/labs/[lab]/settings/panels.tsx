"use client";

import { formatDistanceToNow } from "date-fns";
import { useActionState, useState } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/field";
import type { ActionState } from "@/lib/actions/types";
import {
  changeRoleAction,
  createTokenAction,
  removeMemberAction,
  revokeInvitationAction,
  revokeTokenAction,
  setSampleAccessAction,
} from "../actions";

const ROLES = [
  { value: "owner", label: "Owner" },
  { value: "microscopist", label: "Microscopist" },
  { value: "analyst", label: "Analyst" },
  { value: "collaborator", label: "Collaborator" },
];
const initial: ActionState = { ok: false };
/** A token's prefix: enough to tell tokens apart, never the secret. */
const TOKEN_PREFIX = "num text-xs text-muted";

type Member = { id: string; userId: string; name: string; email: string; role: string; since: string };
type Pending = { id: string; email: string; role: string; expiresAt: string };

function RoleCell({ lab, m, self }: { lab: string; m: Member; self: boolean }) {
  const [state, action, pending] = useActionState(changeRoleAction.bind(null, lab, m.id), initial);
  return (
    <form action={action} className="flex items-center gap-2">
      <label className="sr-only" htmlFor={`role-${m.id}`}>
        Role of {m.name}
      </label>
      <Select id={`role-${m.id}`} name="role" defaultValue={m.role} className="w-40 py-1.5" disabled={pending}>
        {ROLES.map((r) => (
          <option key={r.value} value={r.value}>
            {r.label}
          </option>
        ))}
      </Select>
      <Button type="submit" variant="secondary" className="py-1.5" disabled={pending}>
        Set
      </Button>
      {state.message && !state.ok ? (
        <span className="text-xs text-danger" role="alert">
          {state.message}
        </span>
      ) : null}
      {self ? <span className="text-xs text-muted">you</span> : null}
    </form>
  );
}

function RemoveButton({ lab, m }: { lab: string; m: Member }) {
  const [state, action, pending] = useActionState(removeMemberAction.bind(null, lab, m.id), initial);
  return (
    <form
      action={action}
      onSubmit={(e) => {
        if (!confirm(`Remove ${m.name} from the lab? Their uploads and corrections stay.`)) e.preventDefault();
      }}
    >
      <Button type="submit" variant="ghost" className="py-1.5 text-danger" disabled={pending}>
        Remove
      </Button>
      {state.message && !state.ok ? (
        <span className="text-xs text-danger" role="alert">
          {state.message}
        </span>
      ) : null}
    </form>
  );
}

function RevokeInvite({ lab, id }: { lab: string; id: string }) {
  const [, action, pending] = useActionState(revokeInvitationAction.bind(null, lab, id), initial);
  return (
    <form action={action}>
      <Button type="submit" variant="ghost" className="py-1" disabled={pending}>
        Withdraw
      </Button>
    </form>
  );
}

function SampleAccess({
  lab,
  m,
  samples,
  chosen,
}: {
  lab: string;
  m: Member;
  samples: { id: string; name: string }[];
  chosen: string[];
}) {
  const [state, action, pending] = useActionState(setSampleAccessAction.bind(null, lab, m.userId), initial);
  return (
    <details className="mt-1 text-xs" data-testid={`sample-access-${m.userId}`}>
      <summary className="cursor-pointer text-ink-soft">
        {chosen.length ? `sees ${chosen.length} of ${samples.length} samples` : "sees every sample"}
      </summary>
      <form action={action} className="mt-2 space-y-1 rounded-md border border-line bg-white p-2">
        <p className="text-muted">Tick the samples {m.name} may see; none ticked means all.</p>
        {samples.map((s) => (
          <label key={s.id} className="flex items-center gap-2">
            <input type="checkbox" name="sampleId" value={s.id} defaultChecked={chosen.includes(s.id)} /> {s.name}
          </label>
        ))}
        <Button type="submit" variant="secondary" className="mt-1 px-2 py-1 text-xs" disabled={pending}>
          Save access
        </Button>
        {state.message ? <p className={state.ok ? "text-ok" : "text-danger"}>{state.message}</p> : null}
      </form>
    </details>
  );
}

export function MembersPanel({
  lab,
  members,
  pending,
  selfUserId,
  samples,
  access,
}: {
  lab: string;
  members: Member[];
  pending: Pending[];
  selfUserId: string;
  samples: { id: string; name: string }[];
  access: Record<string, string[]>;
}) {
  return (
    <div className="space-y-4">
      <div className="overflow-x-auto">
        <table className="w-full min-w-[560px] text-sm" data-testid="members-table">
          <thead className="text-left text-xs uppercase tracking-wide text-muted">
            <tr>
              <th scope="col" className="pb-2">
                Person
              </th>
              <th scope="col" className="pb-2">
                Role
              </th>
              <th scope="col" className="pb-2 sr-only">
                Actions
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {members.map((m) => (
              <tr key={m.id}>
                <td className="py-2.5 pr-4">
                  <div className="font-medium">{m.name}</div>
                  <div className="num text-xs text-muted">{m.email}</div>
                  {m.role === "collaborator" ? (
                    <SampleAccess lab={lab} m={m} samples={samples} chosen={access[m.userId] ?? []} />
                  ) : null}
                </td>
                <td className="py-2.5 pr-4">
                  <RoleCell lab={lab} m={m} self={m.userId === selfUserId} />
                </td>
                <td className="py-2.5 text-right">
                  {m.userId === selfUserId ? null : <RemoveButton lab={lab} m={m} />}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pending.length ? (
        <div>
          <h3 className="mb-2 text-xs font-semibold uppercase tracking-wide text-muted">Waiting for an answer</h3>
          <ul className="divide-y divide-line rounded-md border border-line">
            {pending.map((p) => (
              <li key={p.id} className="flex items-center justify-between px-3 py-2 text-sm">
                <span>
                  <span className="num">{p.email}</span> <Badge>{p.role}</Badge>
                </span>
                <span className="flex items-center gap-3 text-xs text-muted">
                  expires {formatDistanceToNow(new Date(p.expiresAt), { addSuffix: true })}
                  <RevokeInvite lab={lab} id={p.id} />
                </span>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </div>
  );
}

type TokenRow = {
  id: string;
  name: string;
  prefix: string;
  userName: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
};

function RevokeToken({ lab, id }: { lab: string; id: string }) {
  const [, action, pending] = useActionState(revokeTokenAction.bind(null, lab, id), initial);
  return (
    <form action={action}>
      <Button type="submit" variant="ghost" className="py-1 text-danger" disabled={pending}>
        Revoke
      </Button>
    </form>
  );
}

/** Copies the new token to the clipboard, and says whether it did (it is shown once). */
function CopyToken({ token }: { token: string }) {
  const [copied, setCopied] = useState<boolean | null>(null);
  return (
    <Button
      type="button"
      variant="secondary"
      className="shrink-0 px-2.5 py-1 text-xs"
      data-testid="copy-token"
      onClick={() =>
        navigator.clipboard.writeText(token).then(
          () => setCopied(true),
          () => setCopied(false),
        )
      }
    >
      {copied === null ? "Copy" : copied ? "Copied" : "Not copied: select it and copy"}
    </Button>
  );
}

export function TokensPanel({
  lab,
  tokens,
  members,
  meId,
}: {
  lab: string;
  tokens: TokenRow[];
  members: { userId: string; name: string }[];
  meId: string;
}) {
  const [state, action, pending] = useActionState(createTokenAction.bind(null, lab), initial);
  const created = state.ok ? (state.data as { token: string; name: string } | undefined) : undefined;
  const me = members.find((m) => m.userId === meId);
  return (
    <div className="space-y-5">
      <p className="text-sm text-ink-soft">
        A token lets a script act as one member, with that member&apos;s role — for example{" "}
        <span className="num">bandcross push</span> on the acquisition PC. It is shown once; Bandcross keeps only its
        hash.
      </p>
      {created ? (
        <Notice tone="ok">
          <p className="font-medium">Token “{created.name}” created. Copy it now: it will not be shown again.</p>
          <div className="mt-2 flex items-center gap-2">
            <code
              className="num block min-w-0 flex-1 select-all break-all rounded bg-white px-2 py-1.5 text-ink"
              data-testid="new-token"
            >
              {created.token}
            </code>
            <CopyToken token={created.token} />
          </div>
        </Notice>
      ) : null}
      {state.message && !state.ok ? <Notice tone="danger">{state.message}</Notice> : null}
      <form action={action} className="grid gap-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end" data-testid="token-form">
        <Field label="Name" name="name" error={state.fieldErrors?.name}>
          <Input name="name" placeholder="e.g. acquisition PC, bay 2" required />
        </Field>
        <Field label="Acts as" name="userId">
          <Select name="userId" defaultValue="">
            {/* The person creating it is listed once, as "Me", not again under their name. */}
            <option value="">{me ? `Me (${me.name})` : "Me"}</option>
            {members
              .filter((m) => m.userId !== meId)
              .map((m) => (
                <option key={m.userId} value={m.userId}>
                  {m.name}
                </option>
              ))}
          </Select>
        </Field>
        <Button type="submit" disabled={pending}>
          Create token
        </Button>
      </form>
      <ul className="divide-y divide-line rounded-md border border-line" data-testid="tokens-list">
        {tokens.length === 0 ? <li className="px-3 py-3 text-sm text-muted">No tokens yet.</li> : null}
        {tokens.map((t) => (
          <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2 text-sm">
            <span>
              <span className="font-medium">{t.name}</span> <span className={TOKEN_PREFIX}>{t.prefix}…</span>{" "}
              <span className="text-xs text-muted">as {t.userName}</span>
            </span>
            <span className="flex items-center gap-3 text-xs text-muted">
              {t.revokedAt ? (
                <Badge tone="danger">revoked</Badge>
              ) : t.lastUsedAt ? (
                `used ${formatDistanceToNow(new Date(t.lastUsedAt), { addSuffix: true })}`
              ) : (
                "never used"
              )}
              {t.revokedAt ? null : <RevokeToken lab={lab} id={t.id} />}
            </span>
          </li>
        ))}
      </ul>
    </div>
  );
}
