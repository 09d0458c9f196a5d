// Stillfield's mark: a few level, parallel lines — a settled field.
export function LogoMark({ className = "h-5 w-5" }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 24" className={className} aria-hidden="true">
      <rect x="3" y="6" width="18" height="2" rx="1" fill="currentColor" />
      <rect x="5" y="11" width="14" height="2" rx="1" fill="currentColor" opacity="0.75" />
      <rect x="7" y="16" width="10" height="2" rx="1" fill="currentColor" opacity="0.5" />
    </svg>
  );
}

export function Wordmark({ className = "" }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-semibold tracking-tight ${className}`}>
      <LogoMark />
      <span>Stillfield</span>
    </span>
  );
}
