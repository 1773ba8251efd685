/** Colours and type of the plots (attributes, not CSS: the SVGs also go into exported images). */
export const THEME = {
  font: 'system-ui, -apple-system, Segoe UI, Roboto, Helvetica Neue, Arial, sans-serif',
  background: '#fbfbf7',
  ink: '#1f2b2a',
  muted: '#5a6764',
  grid: '#e3e7e0',
  frame: '#c9d0c7',
  /** Reference / main series (sage green) and the compared one (ochre). */
  accent: '#2c6a5f',
  accentSoft: '#a9c9bf',
  second: '#b5702c',
  secondSoft: '#e9cfae',
  /** Maximum marks and warnings. */
  alarm: '#9b3b2b',
  /** Faint per-target lines. */
  faint: '#9aa7a2',
} as const;
