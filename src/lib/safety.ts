/** The one wording of the safety caution: the page footer, SafetyCaution, the print report, the exports and the command-line tools all use it. */
export const SAFETY_CAUTION_TEXT =
  'computed joint rates are not safety-rated. Check joint and rate limits, keep an emergency stop within reach, and follow the applicable machine-safety standards and local practice.';

/**
 * The caution as one line of text, for standard error. Labelled "Safety", not "Caution": "caution" is a warning
 * severity of the solve, and the two must not read as the same thing.
 */
export const SAFETY_CAUTION = `Safety: ${SAFETY_CAUTION_TEXT}`;

/** The caution as the first line of an exported CSV file: a comment line, as many CSV readers skip ("#" comment character). */
export const SAFETY_CSV_COMMENT = `# ${SAFETY_CAUTION}`;
