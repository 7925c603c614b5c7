// Thence's palette (app/styles/theme.css) against WCAG 2.1 success criterion 1.4.3 (contrast, minimum): 4.5:1 for
// body text, with relative luminance and contrast ratio as defined in WCAG 2.1's glossary ("relative luminance", "contrast ratio").
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';

const css = fs.readFileSync(new URL('../../app/styles/theme.css', import.meta.url), 'utf8');

/** The hex value of a custom property declared in theme.css. */
function color(name: string): string {
  const match = new RegExp(`${name}:\\s*(#[0-9a-fA-F]{6})\\s*;`).exec(css);
  if (!match) throw new Error(`theme.css declares no hex value for ${name}`);
  return match[1];
}

/** WCAG 2.1 relative luminance of an sRGB colour. */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => {
    const c = parseInt(hex.slice(i, i + 2), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

function contrast(a: string, b: string): number {
  const [light, dark] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (light + 0.05) / (dark + 0.05);
}

describe('theme contrast (WCAG 2.1 SC 1.4.3)', () => {
  it('matches the glossary formula on its end points: black on white is 21:1', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 5);
  });

  // White labels on solid buttons, tags and alerts.
  for (const name of ['primary', 'success', 'warning', 'danger', 'info']) {
    it(`white text on --el-color-${name} and on its hover shade reaches 4.5:1`, () => {
      expect(contrast('#ffffff', color(`--el-color-${name}`))).toBeGreaterThanOrEqual(4.5);
      expect(contrast('#ffffff', color(`--el-color-${name}-dark-2`))).toBeGreaterThanOrEqual(4.5);
    });
  }

  it('text on the page, links and error messages reach 4.5:1', () => {
    const paper = color('--thence-paper');
    expect(contrast(color('--thence-ink'), paper)).toBeGreaterThanOrEqual(7); // SC 1.4.6 (enhanced) for body text
    expect(contrast(color('--thence-ink-soft'), paper)).toBeGreaterThanOrEqual(4.5);
    expect(contrast(color('--thence-copper'), paper)).toBeGreaterThanOrEqual(4.5);
    expect(contrast(color('--el-color-danger'), '#ffffff')).toBeGreaterThanOrEqual(4.5);
  });

  it('the header: its text on ink and ink on the copper call to action reach 4.5:1', () => {
    expect(contrast(color('--thence-header-text'), color('--thence-header'))).toBeGreaterThanOrEqual(4.5);
    expect(contrast(color('--thence-ink'), color('--thence-copper-light'))).toBeGreaterThanOrEqual(4.5);
  });
});
