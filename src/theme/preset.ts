import { definePreset } from '@primeuix/themes';
import Aura from '@primeuix/themes/aura';

/**
 * Kinefold's look: a heather-violet primary over warm stone surfaces, with an amber accent used sparingly
 * (see base.css). Derived from PrimeVue's styled-mode base so components keep their structure.
 */
export const KinefoldPreset = definePreset(Aura, {
  semantic: {
    primary: {
      50: '#f4f2fb',
      100: '#e8e4f7',
      200: '#d2caef',
      300: '#b3a6e2',
      400: '#9280d2',
      500: '#7660c2',
      600: '#5f48ab',
      700: '#4e3a8e',
      800: '#413274',
      900: '#372b5f',
      950: '#221a3c',
    },
    colorScheme: {
      light: {
        surface: {
          0: '#ffffff',
          50: '#faf9f7',
          100: '#f2f0ec',
          200: '#e5e1da',
          300: '#d1cbc1',
          400: '#aaa294',
          500: '#857c6e',
          600: '#675f53',
          700: '#4f483f',
          800: '#37322c',
          900: '#25211d',
          950: '#171411',
        },
        primary: {
          color: '{primary.700}',
          contrastColor: '#ffffff',
          hoverColor: '{primary.800}',
          activeColor: '{primary.900}',
        },
      },
    },
    focusRing: { width: '2px', style: 'solid', color: '{primary.400}', offset: '2px' },
  },
});
