// The field cautions and the "not a legal survey" notice, as the report prints them. Copied from
// README.md ("Field cautions", "Not a legal survey"); test/io/report-notices.test.ts fails when the
// two drift apart. `strong` marks the words README.md sets in bold.

export interface NoticeText {
  /** Plain text with the bold span marked as [[…]]. */
  text: string;
}

export const FIELD_CAUTIONS: readonly string[] = [
  'Work away from traffic; wear high-visibility clothing near roads and park off the carriageway.',
  'Mind the terrain: edges, loose ground, water and livestock. Do not work alone in remote places; leave your route and return time with someone.',
  'Watch the weather: lightning, heat, cold and wind. Stop before conditions turn; an instrument on a tripod is a lightning target.',
  '[[Never point an optical instrument (telescope, theodolite, finder) at the sun without a proper solar filter over the objective.]] Blindness is instant and permanent.',
  'Keep the phone charged and carry a paper backup of station codes and readings.',
];

export const LEGAL_NOTICE =
  "arcfield's results are for science, teaching and planning. They are [[not a legal or cadastral survey]]. For boundaries, construction or anything with legal effect, defer to local regulations and to licensed surveyors.";
