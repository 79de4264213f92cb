import type { Metadata } from "next";
import { describeUnsubscribe } from "@/lib/services/alerts/describeUnsubscribe";
import { systemContext } from "@/lib/services/system";
import { ConfirmUnsubscribe } from "./confirm";

export const metadata: Metadata = { title: "Stop e-mails", robots: { index: false } };

/**
 * The unsubscribe link of a crossing e-mail. Opening it changes nothing (mail scanners fetch
 * links before people click them); the button below does, once, without signing in.
 */
export default async function UnsubscribePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const info = await describeUnsubscribe({ ctx: systemContext("unsubscribe link"), input: { token: decodeURIComponent(token) } });
  if (!info) {
    return (
      <div className="w-full max-w-sm">
        <h1 className="text-2xl font-semibold">This link is not valid</h1>
        <p className="mt-2 text-sm text-ink-soft">
          It may have been cut off by your mail program. Open the sample in Bandcross and use its Watch button instead.
        </p>
      </div>
    );
  }
  return (
    <div className="w-full max-w-sm">
      <p className="text-xs font-semibold uppercase tracking-[0.14em] text-copper">E-mail alerts</p>
      <h1 className="mt-1 text-2xl font-semibold">Stop e-mails about {info.sampleName}?</h1>
      <p className="mt-2 text-sm text-ink-soft">
        For <span className="num">{info.email}</span> in {info.labName}. You will no longer hear when this sample&apos;s
        critical field is found, moves or is confirmed. You can watch it again from the sample&apos;s page.
      </p>
      <div className="mt-8">
        {info.watching ? (
          <ConfirmUnsubscribe token={decodeURIComponent(token)} sampleName={info.sampleName} />
        ) : (
          <p className="text-sm text-ok">You already get no e-mails about this sample.</p>
        )}
      </div>
    </div>
  );
}
