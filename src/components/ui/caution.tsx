/** The cautions of the design, shown wherever people read scores. */
export function Caution() {
  return (
    <aside
      aria-label="How to read these scores"
      className="mt-8 rounded-lg border-l-4 border-brass-500 bg-brass-100/60 px-4 py-3 text-sm text-ink-800"
    >
      <p className="font-semibold">Read with care</p>
      <p className="mt-1">
        Scores are estimates from public ratings, not verdicts on a product or a reviewer. A negative cluster
        is a reason to read the reviews, not proof of a defect or of manipulation. Reviewer identifiers are
        personal data: Ballast stores only what the job needs and never shows them in digests; follow your
        company&apos;s policy and local law.
      </p>
    </aside>
  );
}
