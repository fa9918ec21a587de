import { ferroTeal, severity } from './palette'

type Tone = keyof typeof severity

/** Message tokens per tone; Aura's stock tones (e.g. yellow.600 on yellow.50) fall below 4.5:1. */
function messageTone(tone: Tone) {
  const s = severity[tone]
  return {
    background: s.background,
    borderColor: s.border,
    color: s.color,
    shadow: 'none',
    closeButton: { hoverBackground: s.border, focusRing: { color: s.color, shadow: 'none' } },
    outlined: { color: s.color, borderColor: s.color },
    simple: { color: s.color },
  }
}

const tones: Tone[] = ['info', 'success', 'warn', 'error', 'secondary']
const byTone = <T>(make: (t: Tone) => T) => Object.fromEntries(tones.map((t) => [t, make(t)]))

/** Tags call the error tone "danger". */
const tagTones = Object.fromEntries(
  tones.map((t) => [t === 'error' ? 'danger' : t, { background: severity[t].background, color: severity[t].color }]),
)

/** Solid buttons with white text: Aura fills them with 500 shades, which fall below 4.5:1. */
function solidButton(colour: string) {
  return {
    background: `{${colour}.700}`,
    hoverBackground: `{${colour}.800}`,
    activeBackground: `{${colour}.900}`,
    borderColor: `{${colour}.700}`,
    hoverBorderColor: `{${colour}.800}`,
    activeBorderColor: `{${colour}.900}`,
    focusRing: { color: `{${colour}.700}`, shadow: 'none' },
  }
}

/**
 * Ferrolane's theme: Aura's structure with our own palette (deep teal primary, slate
 * surfaces, amber for attention, red only for alerts), tighter shapes and a compact scale.
 * Only a light scheme for now; dark mode is switched off (see main.ts) until it is designed.
 * These are the overrides only; signInTheme.ts and fullTheme.ts lay them over Aura.
 */
export const ferrolaneOverrides = {
  primitive: {
    ferro: ferroTeal,
    borderRadius: { none: '0', xs: '2px', sm: '3px', md: '4px', lg: '6px', xl: '8px' },
  },
  semantic: {
    primary: {
      50: '{ferro.50}',
      100: '{ferro.100}',
      200: '{ferro.200}',
      300: '{ferro.300}',
      400: '{ferro.400}',
      500: '{ferro.500}',
      600: '{ferro.600}',
      700: '{ferro.700}',
      800: '{ferro.800}',
      900: '{ferro.900}',
      950: '{ferro.950}',
    },
    focusRing: { width: '2px', style: 'solid', color: '{amber.500}', offset: '2px', shadow: 'none' },
    formField: {
      paddingX: '0.625rem',
      paddingY: '0.375rem',
      // Aura hides the ring on fields and relies on the border colour; we keep a visible ring.
      focusRing: { width: '2px', style: 'solid', color: '{primary.600}', offset: '-1px', shadow: 'none' },
    },
    list: { option: { padding: '0.375rem 0.625rem' } },
    navigation: { item: { padding: '0.375rem 0.625rem' } },
    colorScheme: {
      light: {
        surface: {
          0: '#ffffff',
          50: '{slate.50}',
          100: '{slate.100}',
          200: '{slate.200}',
          300: '{slate.300}',
          400: '{slate.400}',
          500: '{slate.500}',
          600: '{slate.600}',
          700: '{slate.700}',
          800: '{slate.800}',
          900: '{slate.900}',
          950: '{slate.950}',
        },
        primary: {
          color: '{primary.600}',
          contrastColor: '#ffffff',
          hoverColor: '{primary.700}',
          activeColor: '{primary.800}',
        },
        highlight: {
          background: '{primary.50}',
          focusBackground: '{primary.100}',
          color: '{primary.800}',
          focusColor: '{primary.900}',
        },
        text: {
          color: '{surface.800}',
          hoverColor: '{surface.900}',
          // slate.500 drops to 4.3:1 on grey panels; slate.600 stays above 6.9:1.
          mutedColor: '{surface.600}',
          hoverMutedColor: '{surface.700}',
        },
        formField: {
          borderColor: '{surface.400}',
          hoverBorderColor: '{surface.500}',
          color: '{surface.800}',
          placeholderColor: '{surface.600}',
          invalidBorderColor: '{red.700}',
          invalidPlaceholderColor: '{red.700}',
          floatLabelColor: '{surface.600}',
          iconColor: '{surface.600}',
        },
      },
    },
  },
  components: {
    message: { colorScheme: { light: byTone(messageTone) }, text: { fontWeight: '400' } },
    tag: { colorScheme: { light: tagTones }, root: { fontWeight: '600' } },
    datatable: {
      headerCell: { padding: '0.5rem 0.625rem' },
      bodyCell: { padding: '0.4375rem 0.625rem' },
    },
    button: {
      root: { paddingX: '0.875rem', paddingY: '0.4375rem' },
      colorScheme: {
        light: {
          root: {
            danger: solidButton('red'),
            warn: solidButton('amber'),
            success: solidButton('green'),
            info: solidButton('ferro'),
            secondary: { color: '{surface.700}', hoverColor: '{surface.800}' },
          },
          text: { danger: { color: '{red.700}' }, secondary: { color: '{surface.700}' } },
          outlined: { danger: { color: '{red.700}', borderColor: '{red.300}' }, secondary: { color: '{surface.700}' } },
        },
      },
    },
  },
}
