import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import AccountView from '@/views/AccountView.vue'
import { useSessionStore } from '@/stores/session'
import { fakeServer, on } from './fakeServer'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const GOOD = 'Spruce top, maple back, 1742'

async function show() {
  const pinia = createPinia()
  setActivePinia(pinia)
  useSessionStore().user = {
    id: 3,
    email: 'm.ostby@larchmere.example',
    name: 'Maren Ostby',
    role: 'analyst',
  }
  const w = mount(AccountView, { global: { plugins: [pinia] }, attachTo: document.body })
  await flushPromises()
  return w
}

async function fill(w: Awaited<ReturnType<typeof show>>, current: string, next: string) {
  await w.find('#current-password').setValue(current)
  await w.find('#account-new-password').setValue(next)
  await w.find('#account-repeat-password').setValue(next)
  await w.find('form').trigger('submit')
  await flushPromises()
}

describe('your account page', () => {
  it('shows who is signed in and changes the password', async () => {
    const { sent } = fakeServer(
      on('POST', '/auth/password', () => ({
        body: { user: { id: 3, email: 'm.ostby@larchmere.example', name: 'M', role: 'analyst' } },
      })),
    )
    const w = await show()
    expect(w.text()).toContain('m.ostby@larchmere.example')
    expect(w.text()).toContain('Analyst')

    await fill(w, 'the-old-one-here', GOOD)

    expect(sent.map((r) => [r.method, r.path, r.body])).toEqual([
      ['POST', '/auth/password', { currentPassword: 'the-old-one-here', newPassword: GOOD }],
    ])
    expect(w.text()).toContain('Your password is changed')
    expect((w.find('#current-password').element as HTMLInputElement).value).toBe('')
  })

  it('shows a wrong current password at its field', async () => {
    fakeServer(
      on('POST', '/auth/password', () => ({
        status: 422,
        body: {
          error: {
            code: 'validation_failed',
            message: 'Your current password is not right',
            fields: { currentPassword: ['This is not your current password'] },
          },
        },
      })),
    )
    const w = await show()

    await fill(w, 'not-the-old-one', GOOD)

    expect(w.text()).toContain('This is not your current password')
  })

  it('refuses a new password with the owner’s name before sending, and says why', async () => {
    const { sent } = fakeServer()
    const w = await show()

    await fill(w, 'the-old-one-here', 'MarenOstby plays cello')

    expect(w.find('[data-test=password-meter]').text()).toContain('Contains your name')
    expect(sent).toEqual([])
  })
})
