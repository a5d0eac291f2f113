/** The caution printed wherever computed joint rates leave the app toward a controller (the command-line tools; the pages show it as SafetyCaution). */
export const SAFETY_CAUTION =
  'Caution: computed joint rates are not safety-rated. Check joint and rate limits, keep an emergency stop within reach, and follow the applicable machine-safety standards and local practice.';
