import { createApp } from 'vue'
import { createPinia } from 'pinia'
import App from './App.vue'
import { setUnauthenticatedHandler } from './api/http'
import { storedThemeName } from './composables/use-theme-preference'
import { createNestwiseVuetify } from './plugins/vuetify'
import { createAppRouter } from './router'
import { useSessionStore } from './stores/session'
import './styles/app.css'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
const router = createAppRouter()
app.use(router)
app.use(createNestwiseVuetify(storedThemeName()))

// A session that ends mid-use (expired, signed out in another tab) leads back to sign-in,
// returning to the same page afterwards.
setUnauthenticatedHandler(() => {
  useSessionStore().forget()
  const current = router.currentRoute.value
  if (current.name !== 'sign-in' && !current.meta.public) {
    void router.replace({ name: 'sign-in', query: { redirect: current.fullPath } })
  }
})

app.mount('#app')
