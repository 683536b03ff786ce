/** Tideline's mark: a water line crossing a bar, drawn here, not borrowed. */
export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2 font-bold tracking-wide text-chalk">
      <svg aria-hidden="true" viewBox="0 0 32 32" className="h-7 w-7">
        <rect x="1" y="1" width="30" height="30" rx="6" className="fill-hull-800 stroke-hull-600" />
        <rect x="9" y="6" width="4" height="20" rx="1" className="fill-mist" />
        <rect x="19" y="6" width="4" height="20" rx="1" className="fill-mist" />
        <path d="M3 19c4 0 4-3 8.5-3s4.5 3 9 3 4-3 8.5-3" className="fill-none stroke-brass-400" strokeWidth="3" />
      </svg>
      <span className="text-lg">Tideline</span>
    </span>
  );
}
