/**
 * A design that cannot be built from the input given. Services turn it into a validation error
 * for the session designer; anything else thrown from here is a bug.
 */
export class DesignError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'DesignError'
  }
}
