import { createApp } from 'vue'
import { createPinia } from 'pinia'
import { VueQueryPlugin } from '@tanstack/vue-query'
import PrimeVue from 'primevue/config'
import ConfirmationService from 'primevue/confirmationservice'
import App from './App.vue'
import { queryClient } from './api/queryClient'
import { installGuards, router } from './router'
import { SignInPreset } from './theme/signInTheme'
import './theme/global.css'

const app = createApp(App)
const pinia = createPinia()

app.use(pinia)
installGuards(pinia)
app.use(router)
app.use(VueQueryPlugin, { queryClient })
app.use(PrimeVue, {
  theme: {
    // Only the sign-in page's tokens; the router loads the whole theme for every other screen.
    preset: SignInPreset,
    options: {
      // Light only until a dark scheme is designed; this class is never set.
      darkModeSelector: '.fl-dark',
      // Layered, so Ferrolane's own unlayered CSS wins without !important.
      cssLayer: { name: 'primevue', order: 'primevue' },
    },
  },
})
// Confirmations (deactivate, reset password) are asked through one dialog service.
app.use(ConfirmationService)

app.mount('#app')
