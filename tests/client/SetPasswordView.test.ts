import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import SetPasswordView from '@/views/SetPasswordView.vue'
import { fakeServer, on } from './fakeServer'

// The link's token must reach no server but through a request body: a URL fragment is never part
// of a request (RFC 3986 §3.5, from memory), and the page takes the token out of the address bar
// so history and bookmarks do not keep it.

const TOKEN = 'eyJhbGciOi.fake-token-for-the-page.signature'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const inspect = on('POST', '/auth/link', () => ({
  body: { email: 'orla@larchmere.example', name: 'Orla Testington', purpose: 'invite' },
}))

async function open(address: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/set-password', name: 'set-password', component: SetPasswordView },
      { path: '/', name: 'home', component: { template: '<p>home</p>' } },
      { path: '/forgot-password', name: 'forgot-password', component: { template: '<p/>' } },
    ],
  })
  await router.push(address)
  const w = mount(SetPasswordView, {
    global: { plugins: [router, createPinia()] },
    attachTo: document.body,
  })
  await flushPromises()
  return { w, router }
}

describe('the set-password page', () => {
  it.each([
    ['the fragment', `/set-password#token=${TOKEN}`],
    ['the query of an older mail', `/set-password?token=${encodeURIComponent(TOKEN)}`],
  ])('reads the token from %s, sends it in a body and clears the address', async (_l, address) => {
    const { sent } = fakeServer(inspect)
    const { w, router } = await open(address)

    expect(sent.map((r) => [r.method, r.path, r.body])).toEqual([
      ['POST', '/auth/link', { token: TOKEN }],
    ])
    expect(sent.every((r) => !r.query.toString().includes('token'))).toBe(true)
    expect(router.currentRoute.value.fullPath).toBe('/set-password')
    expect(w.text()).toContain('Orla Testington (orla@larchmere.example)')
  })

  it('refuses a common password before sending it, with the reason', async () => {
    const { sent } = fakeServer(inspect)
    const { w } = await open(`/set-password#token=${TOKEN}`)

    await w.find('#new-password').setValue('1234567890')
    await w.find('#repeat-password').setValue('1234567890')
    await w.find('form').trigger('submit')
    await flushPromises()

    expect(w.text()).toContain('Too common.')
    expect(w.find('[data-test=password-meter]').text()).toContain('Too common.')
    expect(sent.some((r) => r.path === '/auth/set-password')).toBe(false)
  })

  it('sends a good password with the token', async () => {
    const { sent } = fakeServer(
      inspect,
      on('POST', '/auth/set-password', () => ({
        body: { user: { id: 5, email: 'orla@larchmere.example', name: 'Orla', role: 'analyst' } },
      })),
      on('GET', '/auth/me', () => ({ body: { user: null, features: { mailbox: false } } })),
    )
    const { w } = await open(`/set-password#token=${TOKEN}`)
    const good = 'Amber rosin on a winter bridge 7'

    await w.find('#new-password').setValue(good)
    await w.find('#repeat-password').setValue(good)
    expect(w.find('[data-test=password-meter]').text()).toContain('Accepted.')
    await w.find('form').trigger('submit')
    await flushPromises()

    expect(sent.find((r) => r.path === '/auth/set-password')?.body).toEqual({
      token: TOKEN,
      password: good,
    })
  })
})
