import { describe, expect, it } from 'vitest'
import { lockOrder } from '../../server/utils/locks'

// Two transactions that lock the same memberships must take them in the same order, or each can hold
// the row the other waits for (a deadlock).
describe('lockOrder', () => {
  it.each([
    { ids: ['b0000000-0000-0000-0000-000000000002', 'a0000000-0000-0000-0000-000000000001'], want: ['a0000000-0000-0000-0000-000000000001', 'b0000000-0000-0000-0000-000000000002'] },
    { ids: ['A0000000-0000-0000-0000-000000000001', 'a0000000-0000-0000-0000-000000000001'], want: ['a0000000-0000-0000-0000-000000000001'] },
    { ids: ['c3', 'a1', 'b2', 'a1'], want: ['a1', 'b2', 'c3'] },
    { ids: [], want: [] },
  ])('locks $ids as $want', ({ ids, want }) => {
    expect(lockOrder(ids)).toEqual(want)
  })

  it('gives the same order whichever side asks first', () => {
    const actor = '9d1c2e00-0000-4000-8000-000000000001'
    const target = '1a2b3c00-0000-4000-8000-000000000002'
    expect(lockOrder([actor, target])).toEqual(lockOrder([target, actor]))
    expect(lockOrder([actor, target])[0]).toBe(target)
  })
})
