import { forwardRef, type ButtonHTMLAttributes, type ReactNode } from "react";
import { Link } from "react-router-dom";

type Variant = "primary" | "secondary" | "ghost" | "danger";

const styles: Record<Variant, string> = {
  primary: "bg-accent text-white hover:bg-[#9a3412] border border-accent",
  secondary: "bg-sheet text-ink border border-ink hover:bg-paper",
  ghost: "bg-transparent text-ink border border-transparent hover:border-rule",
  danger: "bg-sheet text-bad border border-bad hover:bg-[#fbeaea]",
};

/** A button's look, for a link that acts as one (a download, another page) as well as for buttons. */
export function buttonClass(variant: Variant = "secondary", size: "sm" | "md" = "md"): string {
  const pad = size === "sm" ? "px-2.5 py-1 text-sm" : "px-4 py-2 text-[0.95rem]";
  return `inline-flex items-center justify-center gap-2 rounded-sm font-medium transition-colors ${pad} ${styles[variant]}`;
}

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  size?: "sm" | "md";
  busy?: boolean;
}

export const Button = forwardRef<HTMLButtonElement, ButtonProps>(function Button(
  { variant = "secondary", size = "md", busy = false, className = "", children, disabled, ...rest },
  ref,
) {
  return (
    <button
      ref={ref}
      type="button"
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`${buttonClass(variant, size)} disabled:cursor-not-allowed disabled:opacity-60 ${className}`}
      {...rest}
    >
      {busy ? <span aria-hidden className="inline-block size-3 animate-spin rounded-full border-2 border-current border-r-transparent" /> : null}
      {children}
    </button>
  );
});

/** A link to another page drawn as a button; `primary` for the main action of a page head ("New update"). */
export function ButtonLink({ to, variant = "secondary", children }: { to: string; variant?: Variant; children: ReactNode }) {
  return (
    <Link to={to} className={buttonClass(variant)}>
      {children}
    </Link>
  );
}

export function PrimaryLink({ to, children }: { to: string; children: ReactNode }) {
  return (
    <ButtonLink to={to} variant="primary">
      {children}
    </ButtonLink>
  );
}
