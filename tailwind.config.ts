import type { Config } from 'tailwindcss'
import { SURFACES, SWATCHES, DIRECTION_INK } from './shared/deviation'

// One source for colours: the deviation scale and the surfaces come from shared/deviation.ts,
// which charts and tests read as well.
export default {
  content: ['./shared/deviation.ts'],
  // Deviation classes are built from tokens at run time in some charts; keep them all.
  safelist: [
    { pattern: /^(bg|text|border|fill|stroke)-(flat|sharp|off)-[123]$/ },
    { pattern: /^(bg|text|border|fill|stroke)-(in-tune|no-pitch)$/ },
    { pattern: /^text-(flat|sharp|in-tune)-ink$/ },
  ],
  theme: {
    extend: {
      colors: {
        'paper': SURFACES.paper,
        'raised': SURFACES.raised,
        'sunk': SURFACES.sunk,
        'rule': SURFACES.rule,
        'control': SURFACES.control,
        'ink': SURFACES.ink,
        'muted': SURFACES.muted,
        'accent': SURFACES.accent,
        'flat-1': SWATCHES['flat-1'].fill,
        'flat-2': SWATCHES['flat-2'].fill,
        'flat-3': SWATCHES['flat-3'].fill,
        'sharp-1': SWATCHES['sharp-1'].fill,
        'sharp-2': SWATCHES['sharp-2'].fill,
        'sharp-3': SWATCHES['sharp-3'].fill,
        'in-tune': SWATCHES['in-tune'].fill,
        'off-1': SWATCHES['off-1'].fill,
        'off-2': SWATCHES['off-2'].fill,
        'off-3': SWATCHES['off-3'].fill,
        'no-pitch': SWATCHES.none.fill,
        'flat-ink': DIRECTION_INK.flat,
        'sharp-ink': DIRECTION_INK.sharp,
        'in-tune-ink': DIRECTION_INK['in-tune'],
      },
      fontFamily: {
        sans: ['Lato', 'ui-sans-serif', 'system-ui', 'sans-serif'],
      },
      maxWidth: {
        page: '72rem',
      },
      boxShadow: {
        paper: '0 1px 0 rgba(31, 32, 35, 0.04), 0 1px 3px rgba(31, 32, 35, 0.06)',
      },
    },
  },
} satisfies Config
