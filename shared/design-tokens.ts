/**
 * Netput's design tokens: the colours, type and spacing every surface draws with — the Material theme
 * and global styles (through src/styles/_tokens.scss, which repeats these values for Sass), the grid
 * theme (src/app/shared/grid.ts), the chart theme (src/app/shared/chart-theme.ts) and the e-mails
 * (server/mail/). shared/design-tokens.test.ts checks that the Sass file holds the same values, so a
 * colour is changed here and there together or the test fails.
 *
 * The direction: an olive field green for what the co-op plans and records, a ripe-grain ochre for
 * the model's figures and highlights, on a warm straw paper, with dark loam text. Headings in a slab
 * serif (Bitter), text and figures in a humanist sans with tabular digits (Source Sans 3).
 */

/** Colours by role. Each text colour passes 4.5:1 on `paper`, `paperDeep` and `card` (checked in the test). */
export const COLOUR = {
  // Seeds of the Material palettes (src/styles/_theme-colors.scss was generated from these three).
  seedField: '#55692b',
  seedGrain: '#b0772a',
  seedStraw: '#78746a',

  /** Olive field green: primary actions, the current place in the navigation, recorded figures. */
  field: '#516528',
  /** Darker field green: the header band, headings' rule, pressed states. */
  fieldDeep: '#2f4106',
  /** A pale wash of the field green: highlighted rows, selected chips. */
  fieldWash: '#e6efd0',
  /** Ripe-grain ochre: the model's figures, marks of the current season. Large text and marks only. */
  grain: '#a26b1f',
  /** Ochre dark enough for body text on paper. */
  grainText: '#7a4a00',
  /** A pale wash of the ochre: notes, the outlook's state. */
  grainWash: '#fbeedb',
  /** Warm straw paper behind every page. */
  paper: '#fff9ed',
  /** Deeper straw: the navigation rail, grid headers. */
  paperDeep: '#f4ede1',
  /** Sheets (cards, grids) laid on the paper. */
  card: '#fffdf7',
  /** Dark loam: body text. */
  loam: '#1e1b14',
  /** Softer loam: secondary text, axis labels. */
  loamSoft: '#4a473e',
  /** Furrow lines: rules, grid lines, borders. */
  furrow: '#d9d2c3',
  /** Clay red: errors, warnings, the wrong-sign marks. */
  clay: '#a4382a',
  /** River blue: a second series, bands of uncertainty. */
  river: '#2f6680',
} as const;

/**
 * The series palette of every chart, in order: field, grain, river, clay, then four quieter earth
 * colours. Each is at least 3:1 against `card`, so lines and bars stay visible.
 */
export const SERIES = ['#516528', '#a26b1f', '#2f6680', '#a4382a', '#6b4f7a', '#3f7a5c', '#7a5a3a', '#8a7f1c'] as const;

/** Type families. The files come from @fontsource-variable (angular.json); e-mails fall back to the system fonts. */
export const FONT = {
  text: "'Source Sans 3 Variable', 'Source Sans 3', 'Segoe UI', system-ui, sans-serif",
  heading: "'Bitter Variable', Bitter, Georgia, 'Times New Roman', serif",
  mono: "ui-monospace, 'SFMono-Regular', Menlo, Consolas, monospace",
} as const;

/** Type sizes in px (text and figures). */
export const TYPE = {
  small: 13,
  body: 15,
  lead: 17,
  title: 20,
  headline: 26,
} as const;

/** Spacing steps in px: everything sits on a 4 px grid. */
export const SPACE = {
  xs: 4,
  s: 8,
  m: 12,
  l: 16,
  xl: 24,
  xxl: 32,
} as const;

/** Corner radii in px: sheets are nearly square, chips and the navigation marker round. */
export const RADIUS = {
  sheet: 6,
  control: 4,
  chip: 14,
} as const;
