import type { FormItemRule } from 'naive-ui'
import { passwordProblems, type PasswordOwner } from '@shared/passwordRule'
// The zxcvbn word lists: imported only by the pages where a password is chosen, which are
// loaded on demand, so no other page carries them.
import { estimateStrength } from '@shared/passwordStrength'

/** The server's password rule as a form rule, with the owner's name and address known. */
export function newPasswordRule(owner: () => PasswordOwner): FormItemRule {
  return {
    trigger: ['blur', 'input'],
    validator: (_rule: FormItemRule, value: unknown) => {
      const problems = passwordProblems(String(value ?? ''), estimateStrength, owner())
      return problems.length ? new Error(problems[0]) : true
    },
  }
}

/** The "same password again" field: it must match the new password as typed. */
export function samePasswordRule(password: () => string): FormItemRule {
  return {
    trigger: ['blur', 'input'],
    validator: (_rule: FormItemRule, value: unknown) =>
      value === password() ? true : new Error('The two passwords differ'),
  }
}
