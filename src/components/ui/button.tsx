import { forwardRef, type ButtonHTMLAttributes, type ReactNode } from "react";
import { Link } from "react-router-dom";

type Variant = "primary" | "secondary" | "ghost" | "danger";

const styles: Record<Variant, string> = {
  primary: "bg-accent text-white hover:bg-[#9a3412] border border-accent",
  secondary: "bg-sheet text-ink border border-ink hover:bg-paper",
  ghost: "bg-transparent text-ink border border-transparent hover:border-rule",
  danger: "bg-sheet text-bad border border-bad hover:bg-[#fbeaea]",
};

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  size?: "sm" | "md";
  busy?: boolean;
}

export const Button = forwardRef<HTMLButtonElement, ButtonProps>(function Button(
  { variant = "secondary", size = "md", busy = false, className = "", children, disabled, ...rest },
  ref,
) {
  const pad = size === "sm" ? "px-2.5 py-1 text-sm" : "px-4 py-2 text-[0.95rem]";
  return (
    <button
      ref={ref}
      type="button"
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`inline-flex items-center justify-center gap-2 rounded-sm font-medium transition-colors disabled:cursor-not-allowed disabled:opacity-60 ${pad} ${styles[variant]} ${className}`}
      {...rest}
    >
      {busy ? <span aria-hidden className="inline-block size-3 animate-spin rounded-full border-2 border-current border-r-transparent" /> : null}
      {children}
    </button>
  );
});

/** A link drawn as the main action of a page head ("New update"). */
export function PrimaryLink({ to, children }: { to: string; children: ReactNode }) {
  return (
    <Link to={to} className="inline-flex items-center rounded-sm border border-accent bg-accent px-4 py-2 font-medium text-white hover:bg-[#9a3412]">
      {children}
    </Link>
  );
}
