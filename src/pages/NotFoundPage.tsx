import { Link } from 'react-router';

export function NotFoundPage() {
  return (
    <div className="max-w-xl">
      <title>Page not found · Tocsin</title>
      <p className="text-sm font-semibold tracking-wide text-signal-700 uppercase">Error 404</p>
      <h1 className="mt-2 text-3xl font-bold tracking-tight">Page not found</h1>
      <p className="mt-4 text-ink-soft">
        There is no page at this address. It may have moved, or the link may be incomplete.
      </p>
      <p className="mt-6">
        <Link to="/">Go to the home page</Link>
      </p>
    </div>
  );
}
