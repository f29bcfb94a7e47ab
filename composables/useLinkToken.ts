import { readApiError } from '~~/shared/utils/api-error'

/** Where a page that acts on an e-mailed link stands. The TOKEN_* states are the server's reason codes. */
export type LinkState = 'idle' | 'working' | 'done' | 'TOKEN_USED' | 'TOKEN_EXPIRED' | 'TOKEN_INVALID' | 'error'

const TOKEN_CODES = ['TOKEN_USED', 'TOKEN_EXPIRED', 'TOKEN_INVALID'] as const

/**
 * Reads `?token=` from the address and runs calls with it, turning the server's refusals
 * (422 TOKEN_USED / TOKEN_EXPIRED / TOKEN_INVALID, 400 for a malformed link) into a state the page shows.
 */
export function useLinkToken() {
  const route = useRoute()
  const token = computed(() => (typeof route.query.token === 'string' ? route.query.token : ''))
  const state = ref<LinkState>(token.value ? 'idle' : 'TOKEN_INVALID')
  const message = ref<string | null>(null)

  async function run<T>(call: (token: string) => Promise<T>): Promise<T | undefined> {
    if (!token.value) {
      state.value = 'TOKEN_INVALID'
      return undefined
    }
    state.value = 'working'
    message.value = null
    try {
      const result = await call(token.value)
      state.value = 'done'
      return result
    }
    catch (error) {
      const read = readApiError(error)
      const known = TOKEN_CODES.find(c => read.codes[0] === c)
      state.value = known ?? (read.status === 400 ? 'TOKEN_INVALID' : 'error')
      message.value = read.message
      return undefined
    }
  }

  return { token, state, message, run }
}
