/** Thrown by Semaphore.run when `maxWaiting` callers already wait: the caller answers "busy". */
export class SemaphoreFullError extends Error {
  constructor() {
    super('too many callers are waiting')
    this.name = 'SemaphoreFullError'
  }
}

/**
 * Lets at most `limit` calls of `run` work at once; later callers wait in arrival order. At most
 * `maxWaiting` may wait: one more is refused at once (SemaphoreFullError) instead of queueing
 * without bound. One process only: it bounds this process's memory, not a cluster's.
 */
export class Semaphore {
  #active = 0
  readonly #waiting: (() => void)[] = []

  constructor(readonly limit: number, readonly maxWaiting = Number.POSITIVE_INFINITY) {
    if (!Number.isInteger(limit) || limit < 1) throw new RangeError(`Semaphore limit must be a whole number of at least 1, not ${limit}`)
  }

  /** How many calls are working now. */
  get active(): number {
    return this.#active
  }

  /** How many calls wait for a turn. */
  get waiting(): number {
    return this.#waiting.length
  }

  /** Runs `work` once a turn is free and gives the turn back when it settles, whether or not it threw. */
  async run<T>(work: () => Promise<T>): Promise<T> {
    if (this.#active >= this.limit) {
      if (this.#waiting.length >= this.maxWaiting) throw new SemaphoreFullError()
      // The releasing call hands its turn straight to the next waiter (active stays counted).
      await new Promise<void>(resolve => this.#waiting.push(resolve))
    }
    else {
      this.#active += 1
    }
    try {
      return await work()
    }
    finally {
      const next = this.#waiting.shift()
      if (next) next()
      else this.#active -= 1
    }
  }
}
