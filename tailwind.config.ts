import type { Config } from 'tailwindcss';

/**
 * Coilpath's theme tokens (docs/UI.md). Technician colours meet WCAG AA with white text; each tint
 * is light enough that its tone's colour as small text on it meets 4.5:1 (checked by axe in the journeys).
 */
export default {
  content: ['./index.html', './apps/web/src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: '#17212B', soft: '#2A3642' },
        slate: { DEFAULT: '#5B6B7A', line: '#D5DDE4', faint: '#EBF0F4' },
        frost: '#F4F7F9',
        copper: { DEFAULT: '#B5562B', hover: '#96451F', tint: '#F6E6DD' },
        coolant: { DEFAULT: '#1F7A8C', tint: '#EEF8F9' },
        ok: { DEFAULT: '#2E7D4F', tint: '#EEF8F1' },
        watch: { DEFAULT: '#8A5A12', base: '#B7791F', tint: '#FBF0DC' },
        alarm: { DEFAULT: '#B3261E', tint: '#FBE4E2' },
        tech: {
          0: '#3F5E8C',
          1: '#6B4E8E',
          2: '#0F6E6E',
          3: '#8A4B2D',
          4: '#4D6B2E',
          5: '#7A3E5D',
          6: '#35566B',
          7: '#6A5A2E',
        },
      },
      fontFamily: {
        sans: ['"Roboto Flex Variable"', '"Roboto Flex"', 'system-ui', 'sans-serif'],
      },
      maxWidth: { content: '1440px' },
      minHeight: { touch: '44px' },
      minWidth: { touch: '44px' },
    },
  },
} satisfies Config;
