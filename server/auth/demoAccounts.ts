/** The demo accounts of the demo seed; refused at sign-in when NODE_ENV=production. */
export const DEMO_PASSWORD = 'ringdown-demo'
export const DEMO_STAFF = [
  { email: 'admin@ringdown.test', name: 'Ada Quillfeather', role: 'admin' },
  { email: 'developer@ringdown.test', name: 'Tomas Verhallen', role: 'developer' },
  { email: 'analyst@ringdown.test', name: 'Maren Ostby', role: 'analyst' },
] as const
export const DEMO_EMAILS: readonly string[] = DEMO_STAFF.map((s) => s.email)
