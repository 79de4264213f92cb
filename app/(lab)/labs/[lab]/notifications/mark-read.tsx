"use client";

import { useRouter } from "next/navigation";
import { useTransition } from "react";
import { Button } from "@/components/ui/button";
import { markReadAction } from "@/lib/actions/alerts";

export function MarkRead({ lab, id }: { lab: string; id: string }) {
  const router = useRouter();
  const [pending, start] = useTransition();
  return (
    <Button
      variant="ghost"
      className="px-2 py-1 text-xs"
      disabled={pending}
      onClick={() =>
        start(async () => {
          await markReadAction(lab, [id]);
          router.refresh();
        })
      }
    >
      Mark read
    </Button>
  );
}

export function MarkAllRead({ lab }: { lab: string }) {
  const router = useRouter();
  const [pending, start] = useTransition();
  return (
    <Button
      variant="secondary"
      data-testid="mark-all-read"
      disabled={pending}
      onClick={() =>
        start(async () => {
          await markReadAction(lab, "all");
          router.refresh();
        })
      }
    >
      {pending ? "Marking…" : "Mark all read"}
    </Button>
  );
}
