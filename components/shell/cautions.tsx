/**
 * The standing cautions (docs/references.md §11): estimates are advisory, export
 * controls, active sonar and marine life. Short by design; shown on every
 * signed-in page.
 */
export function Cautions() {
  return (
    <footer
      aria-labelledby="cautions-title"
      className="mt-12 border-t border-ink-100 pt-5 text-xs leading-relaxed text-ink-500"
    >
      <h2 id="cautions-title" className="mb-2 text-2xs font-semibold tracking-[0.14em] text-amber-600 uppercase">
        Cautions
      </h2>
      <div className="grid gap-4 md:grid-cols-3">
        <p>
          <strong className="font-semibold text-ink-700">Estimates are advisory.</strong> A Cramér–Rao bound limits the
          variance of unbiased estimators; it guarantees nothing for one estimate. Below threshold SNR or snapshot
          counts errors jump sharply; calibration errors, coupling, near-field, wideband or coherent sources break
          subspace methods. A line array cannot tell left from right. Follow your organisation&apos;s rules and licensed
          practice.
        </p>
        <p>
          <strong className="font-semibold text-ink-700">Export controls.</strong> Radar and sonar equipment, software
          and technology can be dual-use controlled: Wassenaar Arrangement Category 6, US EAR ECCN 6A001, EU Regulation
          2021/821 Annex I; defence articles may fall under ITAR. This notice is awareness, not legal advice.
        </p>
        <p>
          <strong className="font-semibold text-ink-700">Active sonar and marine life.</strong> Steerwise only processes
          received data. If you plan transmissions, check your national rules first; in the US, the NOAA/NMFS technical
          guidance on sound and marine-mammal hearing.
        </p>
      </div>
    </footer>
  );
}
