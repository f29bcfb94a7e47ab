/** How many pages `total` rows fill at `pageSize` rows a page; at least 1, so an empty list has page 1. */
export function pageCount(total: number, pageSize: number): number {
  return Math.max(1, Math.ceil(Math.max(0, total) / Math.max(1, pageSize)))
}

/** `page` kept between 1 and the last page of `total` rows (a page past the end becomes the last one). */
export function clampPage(page: number, total: number, pageSize: number): number {
  return Math.min(pageCount(total, pageSize), Math.max(1, Math.floor(page) || 1))
}

/** The 1-based numbers of the first and last row shown on `page` (clamped); 0–0 when there are no rows. */
export function pageRange(page: number, total: number, pageSize: number): { first: number, last: number } {
  if (total <= 0) return { first: 0, last: 0 }
  const shown = clampPage(page, total, pageSize)
  return { first: (shown - 1) * pageSize + 1, last: Math.min(total, shown * pageSize) }
}
