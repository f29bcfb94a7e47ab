import { describe, expect, it } from 'vitest'
import { clampPage, pageCount, pageRange } from '../../shared/utils/paging'

describe('paging arithmetic', () => {
  it.each([
    [0, 25, 1],
    [1, 25, 1],
    [25, 25, 1],
    [26, 25, 2],
    [42, 25, 2],
    [2451, 100, 25],
  ])('%d rows at %d a page fill %d page(s)', (total, size, pages) => {
    expect(pageCount(total, size)).toBe(pages)
  })

  it.each([
    // page, total, size → clamped page
    [99, 42, 25, 2],
    [2, 42, 25, 2],
    [0, 42, 25, 1],
    [-3, 42, 25, 1],
    [5, 0, 25, 1],
    [Number.NaN, 42, 25, 1],
  ])('page %d of %d rows at %d a page is shown as page %d', (page, total, size, shown) => {
    expect(clampPage(page, total, size)).toBe(shown)
  })

  it.each([
    // The reviewer's case: page 99 of 42 rows read "2451–42 of 42".
    [99, 42, 25, { first: 26, last: 42 }],
    [1, 42, 25, { first: 1, last: 25 }],
    [2, 42, 25, { first: 26, last: 42 }],
    [1, 0, 25, { first: 0, last: 0 }],
    [3, 100, 10, { first: 21, last: 30 }],
  ])('page %d of %d rows at %d a page shows rows %j', (page, total, size, range) => {
    expect(pageRange(page, total, size)).toEqual(range)
  })
})
