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
          // Dark enough for placeholders and quiet labels to reach 4.5:1 on white and on surface.100 (WCAG 2.1 AA).
          500: '#6e6558',
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
    focusRing: { width: '2px', style: 'solid', color: '{primary.600}', offset: '2px' },
  },
  components: {
    // Status colours one or two steps darker than the base theme's, so text on the pale boxes and white text on the
    // solid buttons reach WCAG 2.1 AA contrast (4.5:1); the base theme's warning text on its pale yellow is 2.84:1.
    message: { colorScheme: { light: statusText('message') } },
    toast: { colorScheme: { light: statusText('toast') } },
    button: {
      colorScheme: {
        light: {
          root: { danger: solid('red'), warn: solid('orange'), success: solid('green') },
          outlined: {
            danger: { color: '{red.700}' },
            warn: { color: '{orange.700}' },
            success: { color: '{green.700}' },
          },
          text: { danger: { color: '{red.700}' }, warn: { color: '{orange.700}' }, success: { color: '{green.700}' } },
        },
      },
    },
  },
});

function solid(hue: string) {
  return {
    background: `{${hue}.700}`,
    hoverBackground: `{${hue}.800}`,
    activeBackground: `{${hue}.900}`,
    borderColor: `{${hue}.700}`,
    hoverBorderColor: `{${hue}.800}`,
    activeBorderColor: `{${hue}.900}`,
    focusRing: { color: `{${hue}.700}`, shadow: 'none' },
  };
}

/** Message and toast text per severity, on the base theme's pale backgrounds. */
function statusText(component: 'message' | 'toast') {
  const hues = { info: 'blue', success: 'green', warn: 'yellow', error: 'red' } as const;
  return Object.fromEntries(
    Object.entries(hues).map(([severity, hue]) => {
      const color = `{${hue}.800}`;
      const tone =
        component === 'message'
          ? { color, outlined: { color, borderColor: color }, simple: { color } }
          : { color, detailColor: '{surface.800}' };
      return [severity, tone];
    }),
  );
}
