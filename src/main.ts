import { createPinia } from 'pinia';
import PrimeVue from 'primevue/config';
import ConfirmationService from 'primevue/confirmationservice';
import ToastService from 'primevue/toastservice';
import { createApp } from 'vue';
import App from './App.vue';
import { router } from './router';
import { KinefoldPreset } from './theme/preset';
import './theme/base.css';

const app = createApp(App);
app.use(createPinia());
app.use(router);
app.use(PrimeVue, { theme: { preset: KinefoldPreset, options: { darkModeSelector: '.kf-dark' } } });
app.use(ToastService);
app.use(ConfirmationService);
app.mount('#app');
