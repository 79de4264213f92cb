"use client";

import { useEffect } from "react";

/** Steps of the keys that move the selected edge, mV. */
export const FINE_MV = 1;
export const COARSE_MV = 10;

/**
 * The review keys as the help names them; `useReviewKeys` acts on exactly these (`edit` ones only
 * for people who may change picks). F and G are left for other review keys.
 */
const KEY_HELP: { keys: string; does: string; edit?: boolean }[] = [
  { keys: "← →", does: "previous / next spectrum" },
  { keys: "F", does: "next flagged spectrum" },
  { keys: ", .", does: `move the selected edge by ${FINE_MV} mV`, edit: true },
  { keys: "< >", does: `by ${COARSE_MV} mV`, edit: true },
  { keys: "E", does: "switch between the valence and conduction edge", edit: true },
  { keys: "A", does: "accept the pick as it is and go to the next", edit: true },
  { keys: "X", does: "exclude / include", edit: true },
  { keys: "U", does: "undo", edit: true },
];

export interface ReviewKeyActions {
  prev(): void;
  next(): void;
  nextFlagged(): void;
  /** Moves the selected edge by this many mV. */
  move(mV: number): void;
  switchEdge(): void;
  accept(): void;
  toggleExcluded(): void;
  undo(): void;
}

/**
 * The review keys on the window, outside text fields and without modifiers: moving between
 * spectra always; the editing keys only when `edit` (allowed and not busy).
 */
export function useReviewKeys(actions: ReviewKeyActions, edit: boolean) {
  useEffect(() => {
    const editKeys: Record<string, () => void> = {
      ",": () => actions.move(-FINE_MV),
      ".": () => actions.move(FINE_MV),
      "<": () => actions.move(-COARSE_MV),
      ">": () => actions.move(COARSE_MV),
      e: actions.switchEdge,
      a: actions.accept,
      x: actions.toggleExcluded,
      u: actions.undo,
    };
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement;
      if (t && (t.tagName === "INPUT" || t.tagName === "TEXTAREA" || t.tagName === "SELECT" || t.isContentEditable))
        return;
      if (e.metaKey || e.ctrlKey || e.altKey) return;
      const key = e.key.length === 1 ? e.key.toLowerCase() : e.key;
      if (key === "ArrowRight") actions.next();
      else if (key === "ArrowLeft") actions.prev();
      else if (key === "f") actions.nextFlagged();
      else if (edit && editKeys[key]) editKeys[key]();
      else return;
      e.preventDefault();
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  });
}

/** The keys' help under the plot; not shown on touch screens (coarse pointer, no hover). */
export function KeyHelp({ canEdit, selected }: { canEdit: boolean; selected: string }) {
  return (
    <p
      className="px-2 pt-1 text-xs text-muted [@media(hover:none)]:hidden [@media(pointer:coarse)]:hidden"
      data-testid="review-keys"
    >
      Keys:{" "}
      {KEY_HELP.filter((k) => canEdit || !k.edit).map((k, i) => (
        <span key={k.keys}>
          {i ? " · " : ""}
          <kbd className="num font-medium text-ink-soft">{k.keys}</kbd> {k.does}
        </span>
      ))}
      .{canEdit ? ` Selected: the ${selected} edge.` : ""}
    </p>
  );
}
