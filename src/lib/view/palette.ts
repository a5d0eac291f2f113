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
} as const;

/** What each element of the 3D view and its 2D fallback is drawn in. */
export const SCENE_COLOURS = {
  object: PALETTE.rule,
  objectEdge: PALETTE.graphite,
  roller: PALETTE.verdigris,
  chain: PALETTE.graphite,
  contact: PALETTE.ink,
  normal: PALETTE.note,
  velocity: PALETTE.sienna,
  roll: PALETTE.ochre,
  palm: PALETTE.grid,
} as const;

/** Line colours for plots, taken in turn. */
export const SERIES_COLOURS: readonly string[] = [
  PALETTE.verdigris,
  PALETTE.sienna,
  PALETTE.note,
  PALETTE.ochre,
  PALETTE.ink,
  PALETTE.verdigrisDeep,
  PALETTE.graphite,
];

/** Colours of SEVERITY_LEVELS (index 0, none, is not drawn). */
export const SEVERITY_COLOURS: Record<'note' | 'caution' | 'singular', string> = {
  note: PALETTE.note,
  caution: PALETTE.ochre,
  singular: PALETTE.sienna,
};
