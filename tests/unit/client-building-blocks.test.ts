import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick, reactive } from 'vue'
import { z } from 'zod'
import { useApiAction } from '../../composables/useApiAction'
import { useApiForm } from '../../composables/useApiForm'
import { useQueryFilters } from '../../composables/useQueryFilters'
import { MemberDirectoryQuerySchema } from '../../shared/schemas/member'
import { OutboxQuerySchema } from '../../shared/schemas/notice'
import { AuditQuerySchema } from '../../shared/schemas/audit'

// The composables run outside a browser here: the DOM classes their focus code tests against.
beforeAll(() => {
  const g = globalThis as Record<string, unknown>
  for (const name of ['HTMLElement', 'HTMLFormElement', 'Element']) g[name] ??= function DomStandIn() {}
})

const scopes: ReturnType<typeof effectScope>[] = []
function run<T>(setup: () => T): T {
  const scope = effectScope()
  scopes.push(scope)
  return scope.run(setup)!
}
afterEach(() => {
  scopes.splice(0).forEach(s => s.stop())
  vi.restoreAllMocks()
})

/** An error as `$fetch` throws it for `status` with `body`. */
function fetchError(status: number, body: Record<string, unknown>) {
  return Object.assign(new Error(`[POST] "/api/x": ${status}`), { statusCode: status, data: { statusCode: status, ...body } })
}
const flush = () => new Promise(resolve => setTimeout(resolve, 0))

describe('useQueryFilters: a list view in the URL, parsed with the route\'s schema', () => {
  function setup<S extends z.ZodObject<z.ZodRawShape>>(schema: S, query: Record<string, string>) {
    const route = reactive({ query: { ...query } })
    const replace = vi.fn((to: { query: Record<string, unknown> }) => {
      route.query = to.query as Record<string, string>
    })
    return { route, replace, list: run(() => useQueryFilters(schema, { route, router: { replace } })) }
  }

  it.each([
    ['members', MemberDirectoryQuerySchema, { status: 'grace', page: '3', junk: 'x' }, { status: 'grace', page: '3' }],
    ['outbox', OutboxQuerySchema, { status: 'failed', pageSize: '50' }, { status: 'failed', pageSize: '50' }],
    ['audit', AuditQuerySchema, { action: 'member.suspend', page: 'zero' }, { action: 'member.suspend' }],
  ])('%s: a bad or unknown parameter falls back alone; the API gets the short form', (_name, schema, query, api) => {
    const { list } = setup(schema as z.ZodObject<z.ZodRawShape>, query)
    expect(list.apiQuery.value).toEqual(api)
    expect(list.active.value).toBe(true)
  })

  it('update goes back to page 1 unless it sets the page, and drops defaults from the address', async () => {
    const { list, replace } = setup(OutboxQuerySchema, { status: 'failed', page: '4' })
    await list.update({ kind: 'dues_reminder' })
    expect(replace).toHaveBeenLastCalledWith({ query: { status: 'failed', kind: 'dues_reminder' } })
    await list.update({ page: 2 })
    expect(replace).toHaveBeenLastCalledWith({ query: { status: 'failed', kind: 'dues_reminder', page: '2' } })
    expect(list.filters.value.page).toBe(2)
  })

  it('sorting is not filtering; reset clears the view', async () => {
    const { list, replace } = setup(MemberDirectoryQuerySchema, { sort: 'joined', dir: 'desc' })
    expect(list.active.value).toBe(false)
    await list.update({ q: 'tide' })
    expect(list.active.value).toBe(true)
    await list.reset()
    expect(replace).toHaveBeenLastCalledWith({ query: {} })
    expect(list.active.value).toBe(false)
  })

  it('a page past the end moves to the last page that has rows', async () => {
    const { list, replace } = setup(AuditQuerySchema, { page: '9', pageSize: '10' })
    await list.keepPageInRange(42)
    expect(replace).toHaveBeenLastCalledWith({ query: { page: '5', pageSize: '10' } })
    replace.mockClear()
    expect(list.keepPageInRange(42)).toBeUndefined()
    expect(replace).not.toHaveBeenCalled()
  })
})

describe('useApiAction: busy flag, optional confirm step, words, refresh', () => {
  it('runs once at a time, shows the outcome and refreshes after', async () => {
    let finish: (n: number) => void = () => {}
    const call = vi.fn(() => new Promise<number>((resolve) => {
      finish = resolve
    }))
    const refresh = vi.fn(async () => {})
    const action = run(() => useApiAction({ run: call, done: n => `${n} sent.`, refresh }))
    const first = action.execute()
    expect(action.busy.value).toBe(true)
    expect(await action.execute()).toBeUndefined()
    expect(call).toHaveBeenCalledTimes(1)
    finish(3)
    expect(await first).toBe(3)
    expect(action.busy.value).toBe(false)
    expect(action.done.value).toBe('3 sent.')
    expect(action.error.value).toBeNull()
    expect(refresh).toHaveBeenCalledTimes(1)
  })

  it('a refusal becomes its reasons in words; nothing is refreshed', async () => {
    const refresh = vi.fn(async () => {})
    const action = run(() => useApiAction({
      run: async (_id: string) => {
        throw fetchError(422, { message: 'Refused', data: { reasons: [{ code: 'NOT_RETRYABLE', message: 'Only failed notices can be sent again.' }] } })
      },
      refresh,
    }))
    await action.execute('n1')
    expect(action.error.value).toBe('Only failed notices can be sent again.')
    expect(action.done.value).toBeNull()
    expect(action.busyWith.value).toBeNull()
    expect(refresh).not.toHaveBeenCalled()
  })

  it('with confirm, the first execute only asks; cancel forgets; the second execute runs', async () => {
    const call = vi.fn(async (id: string) => id)
    const action = run(() => useApiAction({ run: call, confirm: true }))
    await action.execute('s1')
    expect(action.confirming.value).toEqual({ arg: 's1' })
    expect(call).not.toHaveBeenCalled()
    await action.cancel()
    expect(action.confirming.value).toBeNull()
    await action.execute('s1')
    await action.execute('s1')
    expect(call).toHaveBeenCalledExactlyOnceWith('s1')
    expect(action.confirming.value).toBeNull()
  })
})

describe('useApiForm: schema, submit, server errors on fields, busy, confirm', () => {
  const Schema = z.object({ email: z.string().email('Enter a valid e-mail address'), name: z.string().min(1, 'Enter a name') })
  // Nuxt's vee-validate forms run inside a component; here provide/inject have no component.
  const quiet = () => vi.spyOn(console, 'warn').mockImplementation(() => {})

  it('a valid submit sends the parsed values once and shows the outcome', async () => {
    quiet()
    const submit = vi.fn(async (v: { email: string, name: string }) => ({ id: 1, ...v }))
    const form = run(() => useApiForm({ schema: Schema, initialValues: { email: 'a@b.example', name: 'Ada' }, submit, onSuccess: r => `Saved ${r.name}.` }))
    await form.onSubmit()
    expect(submit).toHaveBeenCalledExactlyOnceWith({ email: 'a@b.example', name: 'Ada' })
    expect(form.done.value).toBe('Saved Ada.')
    expect(form.busy.value).toBe(false)
  })

  it('an invalid form never reaches the server', async () => {
    quiet()
    const submit = vi.fn(async () => null)
    const form = run(() => useApiForm({ schema: Schema, initialValues: { email: 'nope', name: '' }, submit }))
    await form.onSubmit()
    expect(submit).not.toHaveBeenCalled()
    expect(form.errors.value.email).toBe('Enter a valid e-mail address')
  })

  it('400 field messages land on their fields; 422 reasons show in words', async () => {
    quiet()
    const answers = [
      fetchError(400, { message: 'email: That address is taken', data: { fields: { email: 'That address is taken' } } }),
      fetchError(422, { message: 'Refused', data: { reasons: [{ code: 'SIGNUPS_CLOSED', message: 'The club takes no sign-ups this month.' }] } }),
    ]
    const form = run(() => useApiForm({
      schema: Schema,
      initialValues: { email: 'a@b.example', name: 'Ada' },
      submit: async () => {
        throw answers.shift()
      },
    }))
    await form.onSubmit()
    await flush()
    expect(form.errors.value.email).toBe('That address is taken')
    expect(form.error.value).toBe('That address is taken')
    await form.onSubmit()
    expect(form.error.value).toBe('The club takes no sign-ups this month.')
    expect(form.error.value).not.toMatch(/SIGNUPS_CLOSED|Refused|Unprocessable/)
  })

  it('busy: a second submit while one runs is ignored', async () => {
    quiet()
    let finish: () => void = () => {}
    const submit = vi.fn(() => new Promise<null>((resolve) => {
      finish = () => resolve(null)
    }))
    const form = run(() => useApiForm({ schema: Schema, initialValues: { email: 'a@b.example', name: 'Ada' }, submit }))
    const first = form.onSubmit()
    await vi.waitFor(() => expect(submit).toHaveBeenCalled())
    expect(form.busy.value).toBe(true)
    await form.onSubmit()
    finish()
    await first
    await nextTick()
    expect(submit).toHaveBeenCalledTimes(1)
    expect(form.busy.value).toBe(false)
  })

  it('confirm: the first valid submit asks, the second sends; cancelConfirm goes back', async () => {
    quiet()
    const submit = vi.fn(async () => null)
    const form = run(() => useApiForm({ schema: Schema, initialValues: { email: 'a@b.example', name: 'Ada' }, confirm: true, submit }))
    await form.onSubmit()
    expect(form.confirming.value).toBe(true)
    expect(submit).not.toHaveBeenCalled()
    await form.cancelConfirm()
    expect(form.confirming.value).toBe(false)
    await form.onSubmit()
    await form.onSubmit()
    expect(submit).toHaveBeenCalledTimes(1)
    expect(form.confirming.value).toBe(false)
  })
})
