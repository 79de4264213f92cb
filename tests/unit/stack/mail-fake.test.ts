import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Resend } from "resend";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMailFake } from "@/storage-fake/mail.mjs";

let fake: { url: string; close: () => Promise<void> };
let outbox: string;
let resend: Resend;

beforeAll(async () => {
  outbox = fs.mkdtempSync(path.join(os.tmpdir(), "bx-outbox-"));
  fake = await startMailFake({ port: 0, outboxDir: outbox, quiet: true });
  resend = new Resend("re_test_key", { baseUrl: fake.url });
});

afterAll(async () => {
  await fake?.close();
  fs.rmSync(outbox, { recursive: true, force: true });
});

const message = {
  from: "Bandcross <alerts@bandcross.local>",
  to: "ada@example.org",
  subject: "You are invited",
  html: "<p>Join the lab</p>",
  text: "Join the lab",
  replyTo: "owner@example.org",
  tags: [{ name: "kind", value: "invite" }],
};

const outboxFiles = () => fs.readdirSync(outbox).filter((f) => f.endsWith(".json") && !f.startsWith("."));

describe("mail fake through the resend SDK", () => {
  it("stores a message as a file and returns its id", async () => {
    const { data, error } = await resend.emails.send(message);
    expect(error).toBeNull();
    expect(data?.id).toMatch(/^[0-9a-f-]{36}$/);
    const file = outboxFiles().find((f) => f.endsWith(`-${data!.id}.json`));
    expect(file).toBeDefined();
    const stored = JSON.parse(fs.readFileSync(path.join(outbox, file!), "utf8"));
    expect(stored).toMatchObject({
      to: ["ada@example.org"],
      from: message.from,
      subject: message.subject,
      html: message.html,
      text: message.text,
      reply_to: ["owner@example.org"],
    });
    expect(typeof stored.created_at).toBe("string");
    const got = await resend.emails.get(data!.id);
    expect(got.data).toMatchObject({ id: data!.id, subject: message.subject });
  });

  it("honours the idempotency key: same key, same id, stored once", async () => {
    const before = outboxFiles().length;
    const a = await resend.emails.send({ ...message, subject: "Once" }, { idempotencyKey: "invite-42" });
    const b = await resend.emails.send({ ...message, subject: "Once" }, { idempotencyKey: "invite-42" });
    expect(a.error).toBeNull();
    expect(b.data?.id).toBe(a.data?.id);
    expect(outboxFiles().length).toBe(before + 1);
    const clash = await resend.emails.send({ ...message, subject: "Other" }, { idempotencyKey: "invite-42" });
    expect(clash.error?.statusCode).toBe(409);
  });

  it("sends a batch and lists newest first", async () => {
    const { data, error } = await resend.batch.send([
      { ...message, subject: "Batch 1" },
      { ...message, subject: "Batch 2" },
    ]);
    expect(error).toBeNull();
    expect(data?.data).toHaveLength(2);
    const res = await fetch(`${fake.url}/emails?to=ada@example.org`);
    const list = (await res.json()) as { data: { subject: string }[] };
    expect(list.data[0]!.subject).toBe("Batch 2");
    expect(list.data.map((m) => m.subject)).toContain("Once");
  });

  it("answers a bad body with a 422 in the service's error shape", async () => {
    const { data, error } = await resend.emails.send({ ...message, to: [] });
    expect(data).toBeNull();
    expect(error).toMatchObject({ statusCode: 422, name: "validation_error" });
  });

  it("refuses to send without an API key", async () => {
    const res = await fetch(`${fake.url}/emails`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ from: "a@b.c", to: "d@e.f", subject: "s", text: "t" }),
    });
    expect(res.status).toBe(401);
    expect(await res.json()).toMatchObject({ statusCode: 401, name: "missing_api_key" });
  });

  it("keeps ids across a restart of the fake", async () => {
    const { data } = await resend.emails.send(message, { idempotencyKey: "restart-1" });
    await fake.close();
    fake = await startMailFake({ port: 0, outboxDir: outbox, quiet: true });
    const again = new Resend("re_test_key", { baseUrl: fake.url });
    expect((await again.emails.get(data!.id)).data?.id).toBe(data!.id);
    expect((await again.emails.send(message, { idempotencyKey: "restart-1" })).data?.id).toBe(data!.id);
  });
});
