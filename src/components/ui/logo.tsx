export function Logo({ className = 'size-11' }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden>
      <rect width="32" height="32" rx="8" fill="var(--color-ink)" />
      <rect x="6" y="8" width="9" height="16" rx="2" fill="var(--color-paper)" />
      <rect x="17" y="8" width="9" height="16" rx="2" fill="var(--color-accent)" />
    </svg>
  );
}
