import { createApp } from 'vue'
import { createPinia } from 'pinia'
import PrimeVue from 'primevue/config'
import ToastService from 'primevue/toastservice'
import ConfirmationService from 'primevue/confirmationservice'
import '@fontsource/noto-serif/latin-400.css'
import '@fontsource/noto-serif/latin-400-italic.css'
import '@fontsource/noto-serif/latin-700.css'
import '@fontsource/source-sans-3/latin-400.css'
import '@fontsource/source-sans-3/latin-600.css'
import '@fontsource/source-sans-3/latin-700.css'
import '@fontsource/jetbrains-mono/latin-400.css'
import 'primeicons/primeicons.css'
import './assets/main.css'
import App from './App.vue'
import router from './router'
import { IsentropePreset } from './theme/preset'

const app = createApp(App)
app.use(createPinia())
app.use(router)
// https://primevue.org/theming/styled/
app.use(PrimeVue, { theme: { preset: IsentropePreset, options: { darkModeSelector: false, cssLayer: false } } })
app.use(ToastService)
app.use(ConfirmationService)
app.mount('#app')
