// The field cautions and the legal notice, the same words as README.md ("Field cautions", "Not a
// legal survey"); shown in Settings.
export function FieldCautions() {
  return (
    <>
      <div className="af-card" data-testid="field-cautions">
        <h2>Field cautions</h2>
        <ul className="af-caution">
          <li>Work away from traffic; wear high-visibility clothing near roads and park off the carriageway.</li>
          <li>Mind the terrain: edges, loose ground, water and livestock. Do not work alone in remote places; leave your route and return time with someone.</li>
          <li>Watch the weather: lightning, heat, cold and wind. Stop before conditions turn; an instrument on a tripod is a lightning target.</li>
          <li><strong>Never point an optical instrument (telescope, theodolite, finder) at the sun without a proper solar filter over the objective.</strong> Blindness is instant and permanent.</li>
          <li>Keep the phone charged and carry a paper backup of station codes and readings.</li>
        </ul>
      </div>
      <div className="af-card" data-testid="legal-notice">
        <h2>Not a legal survey</h2>
        <p>
          arcfield&apos;s results are for science, teaching and planning. They are <strong>not a legal or cadastral survey</strong>.
          For boundaries, construction or anything with legal effect, defer to local regulations and to licensed surveyors.
        </p>
      </div>
    </>
  );
}
