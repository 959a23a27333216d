import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import SignInView from '@/views/SignInView.vue'

function setup() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/sign-in', name: 'sign-in', component: SignInView },
      { path: '/', name: 'home', component: { template: '<p>home</p>' } },
      { path: '/forgot-password', name: 'forgot-password', component: { template: '<p/>' } },
    ],
  })
  return { router, pinia: createPinia() }
}

afterEach(() => vi.unstubAllGlobals())

describe('the sign-in page', () => {
  it('shows the server’s words when the password is wrong', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(
        async () =>
          new Response(
            JSON.stringify({
              error: { code: 'unauthenticated', message: 'E-mail or password is not right' },
            }),
            { status: 401 },
          ),
      ),
    )
    const { router, pinia } = setup()
    await router.push('/sign-in')
    const w = mount(SignInView, { global: { plugins: [router, pinia] }, attachTo: document.body })
    await w.find('#signin-email').setValue('admin@ringdown.test')
    await w.find('#signin-password').setValue('wrong password')
    await w.find('form').trigger('submit')
    await flushPromises()
    expect(w.find('[role=alert]').text()).toContain('E-mail or password is not right')
    w.unmount()
  })

  it('keeps the button disabled until both fields are filled', async () => {
    const { router, pinia } = setup()
    await router.push('/sign-in')
    const w = mount(SignInView, { global: { plugins: [router, pinia] } })
    expect(w.find('button[type=submit]').attributes('disabled')).toBeDefined()
    await w.find('#signin-email').setValue('admin@ringdown.test')
    await w.find('#signin-password').setValue('x')
    expect(w.find('button[type=submit]').attributes('disabled')).toBeUndefined()
  })
})
