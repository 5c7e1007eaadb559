/** Coilpath's mark: one line that loops once like a coil and runs on as a path. */
export function CoilpathMark({ size = 24, className = '' }: { size?: number; className?: string }) {
  return (
    <svg width={size} height={size} viewBox="0 0 24 24" fill="none" aria-hidden="true" className={className}>
      <path
        d="M2.5 15.5h5.7c2.6 0 4.3-1.6 4.3-3.8 0-1.9-1.4-3.3-3.2-3.3-1.9 0-3.2 1.5-3.2 3.4 0 2.6 2.3 4.1 5.2 4.1h9.7"
        stroke="currentColor"
        strokeWidth="2.3"
        strokeLinecap="round"
        strokeLinejoin="round"
      />
    </svg>
  );
}

export function Wordmark({ className = '' }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-semibold tracking-tight ${className}`}>
      <CoilpathMark className="text-copper" />
      <span>Coilpath</span>
    </span>
  );
}
