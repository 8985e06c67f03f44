/** The cautions shown on the rulebook, safety and submission pages. */
export function SafetyNotes({ compact = false }: { compact?: boolean }) {
  return (
    <section aria-labelledby="safety-heading" className="rounded-xl border border-ember-300 bg-ember-50 p-5 text-ink-800">
      <h2 id="safety-heading" className="mb-2 text-ember-800">Safety first</h2>
      <ul className="list-disc space-y-1 pl-5 text-sm">
        <li>Nozzles run at 200–300 °C and beds at up to 110 °C: let them cool before touching the print or the hotend.</li>
        <li>Never disable thermal-runaway protection or any other firmware safety feature to go faster.</li>
        <li>Do not leave fast prints unattended; fast, heavy moving parts can pinch fingers and knock things over.</li>
        <li>Ventilate when printing styrene-bearing materials such as ABS and ASA, and keep fumes out of living spaces.</li>
        {!compact && <li>Mains wiring of printer kits and heated beds is for people qualified under local electrical codes.</li>}
      </ul>
      <p className="mt-3 text-xs text-ink-600">Hotlap defers to your local codes and to your machine maker&apos;s instructions; where they differ from this page, follow them.</p>
    </section>
  );
}
