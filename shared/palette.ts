/**
 * Cairn's palettes as pure data: every screen takes its colours from these (src/theme/palette.ts turns
 * them into CSS variables), and the PDF report prints in the same ones (server/features/results/pdf-writer.ts).
 */

/** Cairn's light palette: deep teal, warm sand and a coral accent on a calm light background. */
export const LIGHT = {
  primary: '#0b5d5b',
  primaryDark: '#073f3e',
  sand: '#e8d9bf',
  sandLight: '#f3ebdd',
  accent: '#a33a26',
  background: '#f7f4ee',
  surface: '#ffffff',
  text: '#1e2a29',
  muted: '#4f5d5b',
  positive: '#2e6b34',
  negative: '#a3261b',
  warning: '#8a5a00',
  info: '#1f5673',
  /** Text and icons on a teal or coral fill. */
  onPrimary: '#ffffff',
  /** A tint of teal behind the current item and the moderator's picks. */
  primaryTint: '#e4f1ef',
  /** A faint coral behind cautions. */
  accentTint: '#fff8f5',
  /** The amber of warning stripes and marks (not for text). */
  warningMark: '#e0a526',
  warningBg: '#fff4dc',
  warningInk: '#4a3200',
  positiveBg: '#dcefe0',
  positiveInk: '#1f4d26',
  negativeBg: '#fde2dc',
  negativeInk: '#7a1d10',
  /** The offline banner's deeper red: it must read at a glance on a phone in a bright room. */
  negativeDeep: '#5c160c',
  /** Lines and frames on sand and white. */
  line: '#d8cdb8',
  lineLight: '#e4dccd',
  /** The outline of something absent or off (a phone that left), 3:1 against white for a graphic. */
  neutral: '#6b6b6b',
} as const;

/** Cairn's high-contrast dark palette for the projector (read at 8 m). */
export const PROJECTOR = {
  background: '#071a19',
  surface: '#0e2a28',
  text: '#f6f1e7',
  muted: '#c3d1ce',
  teal: '#7fdccf',
  sand: '#ecdcc0',
  coral: '#ff9f8a',
  /** Frames on projector cards. */
  line: '#3a5a57',
} as const;
