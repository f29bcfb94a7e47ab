// WCAG 2.2 contrast arithmetic (success criterion 1.4.3 and its definitions of relative luminance
// and contrast ratio), for checking the palette.

/** Relative luminance of an sRGB colour written #rrggbb (WCAG 2.2, "relative luminance"). */
export function relativeLuminance(hex: string): number {
  const m = hex.match(/^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i)
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`)
  const [r, g, b] = m.slice(1).map((h) => {
    const c = Number.parseInt(h, 16) / 255
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4
  }) as [number, number, number]
  return 0.2126 * r + 0.7152 * g + 0.0722 * b
}

/** Contrast ratio (L1 + 0.05) / (L2 + 0.05), lighter over darker (WCAG 2.2, "contrast ratio"). */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x) as [number, number]
  return (hi + 0.05) / (lo + 0.05)
}
