/** The one wording of the safety caution: the page footer, SafetyCaution, the print report and the command-line tools all use it. */
export const SAFETY_CAUTION_TEXT =
  'computed joint rates are not safety-rated. Check joint and rate limits, keep an emergency stop within reach, and follow the applicable machine-safety standards and local practice.';

/** The caution as one line of text, for standard error. */
export const SAFETY_CAUTION = `Caution: ${SAFETY_CAUTION_TEXT}`;
