/** The poster frame of a recording, or a quiet film-strip placeholder while there is none. */
export function Poster({ id, hasPoster, title, className = "" }: { id: string; hasPoster: boolean; title: string; className?: string }) {
  if (hasPoster) {
    return (
      <img
        src={`/api/recordings/${id}/poster`}
        alt=""
        loading="lazy"
        className={`aspect-video w-full rounded-md bg-graphite object-cover ${className}`}
      />
    );
  }
  return (
    <div
      role="img"
      aria-label={`No poster yet for ${title}`}
      className={`flex aspect-video w-full items-center justify-center rounded-md bg-paper-deep ${className}`}
    >
      <svg width="44" height="32" viewBox="0 0 44 32" aria-hidden>
        <rect x="1" y="1" width="42" height="30" rx="3" fill="none" stroke="#9a6f22" strokeWidth="2" />
        {[6, 14, 22, 30, 38].map((x) => (
          <rect key={x} x={x - 2} y="4" width="4" height="3" fill="#9a6f22" />
        ))}
        {[6, 14, 22, 30, 38].map((x) => (
          <rect key={`b${x}`} x={x - 2} y="25" width="4" height="3" fill="#9a6f22" />
        ))}
        <path d="M18 11l9 5-9 5z" fill="#9a6f22" />
      </svg>
    </div>
  );
}
