import { Link } from 'react-router';

/** The product mark: a ring with a signal dot, and the name in Merriweather. */
export function Brand() {
  return (
    <Link to="/" className="flex items-center gap-2.5 text-ink no-underline hover:text-accent-800">
      <svg aria-hidden="true" viewBox="0 0 32 32" className="size-7">
        <circle cx="16" cy="16" r="12.5" fill="none" stroke="currentColor" strokeWidth="2.5" className="text-accent-700" />
        <circle cx="16" cy="16" r="4" className="fill-signal-700" />
      </svg>
      <span className="font-serif text-xl font-bold tracking-tight">Tocsin</span>
    </Link>
  );
}
