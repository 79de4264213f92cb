import Link from "next/link";
import type { ComponentProps } from "react";

const VARIANTS = {
  primary: "bg-ink text-white hover:bg-night disabled:bg-ink-soft",
  accent: "bg-copper text-white hover:brightness-95",
  secondary: "bg-card text-ink border border-line hover:border-ink-soft",
  ghost: "text-ink-soft hover:bg-line/50 hover:text-ink",
  danger: "bg-card text-danger border border-danger/40 hover:bg-danger-soft",
} as const;

export type ButtonVariant = keyof typeof VARIANTS;

const base =
  "inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-sm font-medium " +
  "transition-colors disabled:cursor-not-allowed disabled:opacity-70 whitespace-nowrap";

export function Button({
  variant = "primary",
  className = "",
  ...props
}: ComponentProps<"button"> & { variant?: ButtonVariant }) {
  return <button className={`${base} ${VARIANTS[variant]} ${className}`} {...props} />;
}

export function ButtonLink({
  variant = "primary",
  className = "",
  ...props
}: ComponentProps<typeof Link> & { variant?: ButtonVariant }) {
  return <Link className={`${base} ${VARIANTS[variant]} ${className}`} {...props} />;
}
