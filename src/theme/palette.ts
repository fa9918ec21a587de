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

/**
 * Severity colours used on light tinted backgrounds: always the 700/800 shades, for contrast.
 * WCAG 2.2 AA asks 4.5:1 for body text (SC 1.4.3). Ratios computed with the WCAG relative-luminance
 * formula from the hex values (Aura's green/amber/red/slate scales and ferroTeal above):
 *   info      ferro.800 #0d4a47 on ferro.50 #eef8f7   9.30:1 (on white 10.06, on slate.50 9.61)
 *   success   green.800 #166534 on green.50 #f0fdf4   6.81:1 (on white 7.13, on slate.50 6.81)
 *   warn      amber.800 #92400e on amber.50 #fffbeb   6.84:1 (on white 7.09, on slate.50 6.78)
 *   error     red.700   #b91c1c on red.50   #fef2f2   5.91:1 (on white 6.47, on slate.50 6.18)
 *   secondary slate.700 #334155 on slate.100 #f1f5f9  9.45:1
 * The "on white / slate.50" figures cover the simple and outlined variants, which have no fill.
 * Aura's stock tones fail: green.600 on green.50 is 3.15:1, yellow.600 on yellow.50 2.84:1.
 * These hold at rest only: while a message fades in its text is partly transparent, so the theme
 * drops transitions under prefers-reduced-motion (global.css) and the browser tests ask for it.
 */
export const severity = {
  info: { background: '{ferro.50}', border: '{ferro.200}', color: '{ferro.800}' },
  success: { background: '{green.50}', border: '{green.200}', color: '{green.800}' },
  warn: { background: '{amber.50}', border: '{amber.300}', color: '{amber.800}' },
  error: { background: '{red.50}', border: '{red.200}', color: '{red.700}' },
  secondary: { background: '{surface.100}', border: '{surface.200}', color: '{surface.700}' },
} as const
