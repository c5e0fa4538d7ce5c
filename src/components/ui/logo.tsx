/** Plumbline's mark: a plumb bob hanging from its line. */
export function Logo({ className = "" }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-semibold tracking-tight ${className}`}>
      <svg aria-hidden viewBox="0 0 20 28" className="h-6 w-auto">
        <path d="M10 0v10" stroke="currentColor" strokeWidth="1.6" />
        <path d="M3 11h14l-7 16z" fill="#c2410c" />
      </svg>
      Plumbline
    </span>
  );
}
