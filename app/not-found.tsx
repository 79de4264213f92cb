import Link from "next/link";
import { connection } from "next/server";
import { BrandMark } from "@/components/brand";

/** Rendered per request, so its scripts carry the response's CSP nonce (proxy.ts); a prerendered page has none. */
export default async function NotFound() {
  await connection();
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center px-6">
      <BrandMark />
      <h1 className="mt-8 text-2xl font-semibold">Nothing here</h1>
      <p className="mt-2 text-sm text-ink-soft">
        This page does not exist, or it belongs to a lab you are not a member of.
      </p>
      <Link href="/labs" className="mt-6 text-sm font-medium text-copper underline">
        Back to your labs
      </Link>
    </main>
  );
}
