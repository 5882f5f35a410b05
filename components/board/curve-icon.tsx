/** A small wave standing for a tone curve (decorative). */
export function CurveIcon({ className = "" }: { className?: string }) {
  return (
    <svg viewBox="0 0 16 10" width="14" height="9" aria-hidden="true" className={`inline-block shrink-0 ${className}`}>
      <path d="M1 7 C 4 7, 4 2, 8 2 S 12 8, 15 5" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
    </svg>
  );
}
