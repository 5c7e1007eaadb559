/** Coilpath's mark: one line that loops once like a coil and runs on as a path. */
export function CoilpathMark({ size = 24, className = '' }: { size?: number; className?: string }) {
  return (
    <svg width={size} height={size} viewBox="0 0 24 24" fill="none" aria-hidden="true" className={className}>
      <path
        d="M2 17h7.2c3.4 0 5.8-2.6 5.8-5.6 0-2.6-1.9-4.6-4.3-4.6-2.5 0-4.3 1.9-4.3 4.4 0 3.4 2.8 5.8 6.6 5.8H22"
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
