/**
 * The palette of src/styles/global.css as literal colours, for drawing on canvas and in WebGL
 * where CSS custom properties do not reach. Keep in step with the @theme block there.
 */
export const PALETTE = {
  paper: '#f6f4ec',
  paperDeep: '#ece8da',
  grid: '#dbe5dd',
  ink: '#1d2733',
  graphite: '#4d5866',
  rule: '#b9c4bd',
  verdigris: '#2d7a6a',
  verdigrisDeep: '#1f5a4e',
  note: '#3f6aa6',
  ochre: '#b7801a',
  sienna: '#b04a26',
  plum: '#7d3c98',
  olive: '#6a7d1e',
  rose: '#b0306f',
  slate: '#8a8f99',
  violet: '#5e35b1',
  magenta: '#e6007e',
  leaf: '#2f9e44',
} as const;

/**
 * What each element of the 3D view and its 2D fallback is drawn in. The arrows have colours of their own, none a
 * warning-severity colour or near one, so an arrow is never read as a warning (tests/unit/view/palette.test.ts).
 */
export const SCENE_COLOURS = {
  object: PALETTE.rule,
  objectEdge: PALETTE.graphite,
  roller: PALETTE.verdigris,
  chain: PALETTE.graphite,
  contact: PALETTE.ink,
  normal: PALETTE.violet,
  velocity: PALETTE.magenta,
  roll: PALETTE.leaf,
  palm: PALETTE.grid,
} as const;

/**
 * Line colours for plots, taken in turn. None is a warning-severity colour or near one, so a line
 * is never read as a warning band (tests/unit/view/palette.test.ts holds the distance).
 */
export const SERIES_COLOURS: readonly string[] = [PALETTE.verdigris, PALETTE.plum, PALETTE.ink, PALETTE.olive, PALETTE.rose, PALETTE.slate];

/** Colours of SEVERITY_LEVELS (index 0, none, is not drawn). */
export const SEVERITY_COLOURS: Record<'note' | 'caution' | 'singular', string> = {
  note: PALETTE.note,
  caution: PALETTE.ochre,
  singular: PALETTE.sienna,
};
