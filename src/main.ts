import { createApp } from 'vue'
import { createPinia } from 'pinia'
import '@fontsource/atkinson-hyperlegible/400.css'
import '@fontsource/atkinson-hyperlegible/700.css'
import './theme/global.css'
import App from './App.vue'
import { createRingdownRouter } from './router'
import { onUnauthenticated } from './api/client'
import { useSessionStore } from './stores/session'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
const router = createRingdownRouter()
app.use(router)

// One place for an expired or revoked session: forget the user and ask them to sign in again.
onUnauthenticated(() => {
  useSessionStore(pinia).forget()
  const here = router.currentRoute.value
  if (here.meta.roles) {
    void router.push({ name: 'sign-in', query: { next: here.fullPath, expired: '1' } })
  }
})

app.mount('#app')
