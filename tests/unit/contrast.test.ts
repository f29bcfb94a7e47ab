import { describe, it, expect } from 'vitest'
import tailwindConfig from '../../tailwind.config'
import { contrastRatio } from '../support/contrast'

// WCAG 2.2 AA: text ≥ 4.5:1, interface components ≥ 3:1 (SC 1.4.3, 1.4.11).
const colors = tailwindConfig.theme.extend.colors
const WHITE = '#ffffff'

describe('the contrast arithmetic', () => {
  // Check values from the WCAG 2.2 definitions of relative luminance and contrast ratio.
  it.each([
    ['#767676', 4.542, true],
    ['#777777', 4.478, false],
  ])('%s on white is %d:1 (text AA: %s)', (grey, ratio, passes) => {
    expect(contrastRatio(grey, WHITE)).toBeCloseTo(ratio, 3)
    expect(contrastRatio(grey, WHITE) >= 4.5).toBe(passes)
  })

  it.each([
    ['#949494', 3.033, true],
    ['#959595', 2.995, false],
  ])('%s on white is %d:1 (components 3:1: %s)', (grey, ratio, passes) => {
    expect(contrastRatio(grey, WHITE)).toBeCloseTo(ratio, 3)
    expect(contrastRatio(grey, WHITE) >= 3).toBe(passes)
  })
})

describe('the palette', () => {
  // Every text/background pairing the screens use (grep the classes when adding one).
  const TEXT_PAIRS: [string, string, string][] = [
    ['ink on white', colors.ink.DEFAULT, WHITE],
    ['ink on sand', colors.ink.DEFAULT, colors.sand.DEFAULT],
    ['soft ink on white', colors.ink.soft, WHITE],
    ['soft ink on sand', colors.ink.soft, colors.sand.DEFAULT],
    ['soft ink on deep sand', colors.ink.soft, colors.sand.deep],
    ['muted ink on white', colors.ink.muted, WHITE],
    ['muted ink on sand', colors.ink.muted, colors.sand.DEFAULT],
    ['marsh link on white', colors.marsh[700], WHITE],
    ['marsh link on sand', colors.marsh[700], colors.sand.DEFAULT],
    ['dark marsh on pale marsh', colors.marsh[800], colors.marsh[50]],
    ['white on marsh button', WHITE, colors.marsh[700]],
    ['white on dark marsh (hover)', WHITE, colors.marsh[800]],
    ['brick error on white', colors.brick[700], WHITE],
    ['brick error on pale brick', colors.brick[700], colors.brick[50]],
    ['white on brick button', WHITE, colors.brick[700]],
    ['amber on pale amber (cautions)', colors.amber[800], colors.amber[50]],
    ['ink on pale amber (cautions)', colors.ink.DEFAULT, colors.amber[50]],
    ['tide on pale tide', colors.tide[700], colors.tide[50]],
  ]

  it.each(TEXT_PAIRS)('%s meets text AA (4.5:1)', (_label, fg, bg) => {
    expect(contrastRatio(fg, bg)).toBeGreaterThanOrEqual(4.5)
  })

  it('input borders and focus rings stand out (3:1)', () => {
    expect(contrastRatio(colors.ink.muted, WHITE)).toBeGreaterThanOrEqual(3)
    expect(contrastRatio(colors.tide[700], colors.sand.DEFAULT)).toBeGreaterThanOrEqual(3)
  })
})
