import { ThemeService } from '@primeuix/styled';
import Base from '@primevue/core/base';
import type { Plugin } from 'vue';

const forgetLoadedStyleNames = Base.clearLoadedStyleNames.bind(Base);

/**
 * Forgets every sheet only when PrimeVue's base sheet is not in the page, as when the first component to write it
 * was unmounted before it could: the sheets are then written again by the next component, as PrimeVue would.
 * (The registry's names do not all name a sheet in the page, so the base sheet is the one checked.)
 */
function forgetIfBaseSheetMissing(): void {
  if (!document.head.querySelector('style[data-primevue-style-id="base"]')) forgetLoadedStyleNames();
}

/**
 * Keeps PrimeVue from writing its style sheets into the page again for every component it mounts. Install it after
 * PrimeVue, whose own install removes every `theme:change` listener.
 *
 * PrimeVue 4.5 (and 5.0) keeps a set of the style sheets it has put in the page, so that each is written once. But
 * every component and directive, as it mounts (directives also on every update), empties that set, because it
 * registers for theme changes through a helper that also clears it (`_themeChangeListener`). The next component
 * then writes the base sheet's text into its `<style>` element again, unchanged. To the browser each write is a new
 * style sheet, so the whole page's style is worked out again at the next frame. The review screen paid that on
 * every clip it showed, and the queue page on every row.
 *
 * Now a mount forgets them only when the base sheet is missing from the page. Kinefold sets its theme once, at
 * start-up; when a theme does change (PrimeVue's `theme:change` event), the whole set is forgotten. This listener is added before any component registers its own, so it runs first and the
 * components then write their sheets again, as PrimeVue intends.
 */
export const keepLoadedStyles: Plugin = {
  install() {
    Base.clearLoadedStyleNames = forgetIfBaseSheetMissing;
    ThemeService.on('theme:change', forgetLoadedStyleNames);
  },
};
