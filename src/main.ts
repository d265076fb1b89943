import { createPinia } from 'pinia';
import PrimeVue from 'primevue/config';
import ConfirmationService from 'primevue/confirmationservice';
import ToastService from 'primevue/toastservice';
import { createApp } from 'vue';
import App from './App.vue';
import { router } from './router';
import { keepLoadedStyles } from './theme/keep-loaded-styles';
import { KinefoldPreset } from './theme/preset';
import './theme/base.css';

const app = createApp(App);
app.use(createPinia());
app.use(router);
app.use(PrimeVue, {
  theme: { preset: KinefoldPreset, options: { darkModeSelector: '.kf-dark' } },
  // A password box is a text box: ARIA does not allow aria-expanded on it (WCAG 4.1.2), strength meter or not.
  pt: { password: { pcInputText: { root: { 'aria-expanded': undefined } } } },
});
app.use(keepLoadedStyles);
app.use(ToastService);
app.use(ConfirmationService);
app.mount('#app');
