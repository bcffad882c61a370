/** Gatepost's mark: two gate posts, the light beam between them, and the projectile crossing it. */
export function LogoMark({ className = 'h-8 w-8' }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect width="32" height="32" rx="7" fill="#16324a" />
      <rect x="7" y="6" width="4" height="20" rx="1.5" fill="#e6edf3" />
      <rect x="21" y="6" width="4" height="20" rx="1.5" fill="#e6edf3" />
      <path d="M11 16h10" stroke="#f2a541" strokeWidth="2" strokeDasharray="2 2" />
      <circle cx="16" cy="16" r="3.2" fill="#f2a541" />
    </svg>
  );
}

export function Wordmark({ inverted = false }: { inverted?: boolean }) {
  return (
    <span className="flex items-center gap-2">
      <LogoMark />
      <span className={`text-lg font-semibold tracking-tight ${inverted ? 'text-white' : 'text-harbour-800'}`}>Gatepost</span>
    </span>
  );
}
