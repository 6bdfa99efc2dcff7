// Our mark: three rills joining into one channel, drawn as strokes so it stays crisp at any size.
export function Wordmark({ className = "" }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-semibold tracking-tight text-graphite ${className}`}>
      <svg viewBox="0 0 24 24" width="22" height="22" aria-hidden="true" className="text-lichen">
        <path
          d="M4 3c1.5 4 3 6 6 8M12 2c0 4 0 6-1 9M20 4c-2 4-5 6-9 7M11 11c0 4 0 7 1 11"
          fill="none"
          stroke="currentColor"
          strokeWidth="2.2"
          strokeLinecap="round"
        />
      </svg>
      <span>Rillscale</span>
    </span>
  );
}
