// Entry of the Ebullio console. Fonts and icons come from npm packages: the page loads nothing
// from outside its own origin.
import '@fontsource/roboto/400.css';
import '@fontsource/roboto/500.css';
import '@fontsource/roboto/700.css';
import { createPinia } from 'pinia';
import { createApp } from 'vue';
import App from './App.vue';
import { createEbullioVuetify } from './plugins/vuetify.js';
import { router } from './router/index.js';

createApp(App).use(createPinia()).use(router).use(createEbullioVuetify()).mount('#app');
