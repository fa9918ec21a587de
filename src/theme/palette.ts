/**
 * Ferrolane's own colour scales. The teal is deeper than stock palettes so that white text
 * on the primary colour (600 and darker) keeps a contrast above 4.5:1 (WCAG 2.2 AA).
 * Measured: white on 600 = 6.0:1, on 700 = 7.8:1, on 900 = 12.2:1.
 */
export const ferroTeal = {
  50: '#eef8f7',
  100: '#d3eeeb',
  200: '#a8dcd7',
  300: '#72c3bc',
  400: '#3fa59d',
  500: '#1f8a82',
  600: '#136f69',
  700: '#0e5c58',
  800: '#0d4a47',
  900: '#0b3c3a',
  950: '#052423',
}

/** Severity colours used on light tinted backgrounds: always the 700/800 shades, for contrast. */
export const severity = {
  info: { background: '{ferro.50}', border: '{ferro.200}', color: '{ferro.800}' },
  success: { background: '{green.50}', border: '{green.200}', color: '{green.800}' },
  warn: { background: '{amber.50}', border: '{amber.300}', color: '{amber.800}' },
  error: { background: '{red.50}', border: '{red.200}', color: '{red.700}' },
  secondary: { background: '{surface.100}', border: '{surface.200}', color: '{surface.700}' },
} as const
