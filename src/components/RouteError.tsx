// Shown when rendering a route throws: a plain message, a way back, and no technical dump.
import { Link, useRouteError } from 'react-router';
import { CautionFooter } from './CautionFooter';

export function RouteError() {
  const error = useRouteError();
  if (import.meta.env.DEV) console.error(error);
  return (
    <div className="flex min-h-screen flex-col">
      <main id="main" className="mx-auto w-full max-w-3xl flex-1 px-6 py-16">
        <title>Something went wrong · Tocsin</title>
        <h1 className="text-3xl font-bold">Something went wrong</h1>
        <p className="mt-4 text-ink-soft">This page failed to display. Reloading often helps; if it keeps happening, tell your administrator.</p>
        <p className="mt-6 flex gap-4">
          <button type="button" className="underline text-accent-700" onClick={() => window.location.reload()}>
            Reload the page
          </button>
          <Link to="/">Go to the home page</Link>
        </p>
      </main>
      <CautionFooter />
    </div>
  );
}
