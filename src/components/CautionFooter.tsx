export const CAUTION_TEXT =
  "Tocsin's numbers are analysis aids; official impact-risk statements come from the responsible national and international authorities.";

/** The standing caution shown at the foot of every screen. */
export function CautionFooter() {
  return (
    <footer className="mt-auto border-t border-rule bg-white/60">
      <div className="mx-auto flex max-w-6xl items-start gap-3 px-4 py-5 text-sm text-ink-soft sm:px-6">
        <span aria-hidden="true" className="mt-1 inline-block size-3 shrink-0 rounded-full border-2 border-signal-700" />
        <p data-testid="caution">{CAUTION_TEXT}</p>
      </div>
    </footer>
  );
}
