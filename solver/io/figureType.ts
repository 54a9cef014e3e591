/**
 * The type of every figure: one open font (DejaVu Sans, which has Greek,
 * sub- and superscript digits and the minus sign), sizes in points, and text
 * as SVG `<text>` — PNGs are rendered from the same SVG with the same font
 * file, so both carry the same words in the same places.
 */
export const FIGURE_FONT_FAMILY = "'DejaVu Sans', Verdana, Arial, sans-serif";

/** Sizes and spacings in points (1/72 inch); a figure's `dpi` turns them into pixels. */
export const FIGURE_TYPE = {
  title: 12,
  caption: 9,
  tick: 8,
  barTitle: 10,
  axis: 9,
  margin: 8,
  barWidth: 10,
  tickLength: 4,
  tickGap: 3,
} as const;

/** Advance widths of DejaVu Sans in em (from its metrics, rounded up), for laying text out before it is drawn. */
function charWidth(c: string): number {
  if (/[0-9]/.test(c)) return 0.64;
  if (c === '.' || c === ',' || c === ':' || c === ';' || c === ' ' || c === 'i' || c === 'l' || c === 'j' || c === '|') return 0.33;
  if (c === '-' || c === '(' || c === ')' || c === '[' || c === ']' || c === 'f' || c === 't' || c === 'r') return 0.42;
  if (c === '−' || c === '+' || c === '=' || c === '×' || c === '<' || c === '>') return 0.84;
  if (c === 'm' || c === 'w' || c === 'M' || c === 'W') return 0.98;
  if (/[A-Z]/.test(c)) return 0.74;
  return 0.62;
}

/** Width of a line of text in em (markup ^{…} and _{…} counted at 70 %). */
export function textWidthEm(text: string): number {
  let w = 0;
  for (const part of parseMarkup(text)) for (const c of part.text) w += charWidth(c) * (part.shift ? 0.7 : 1);
  return w;
}

/** Text as type sets it: the minus sign (U+2212), not a hyphen, in every number a figure shows. */
export const typeset = (s: string) => s.replace(/-/g, '−');

export const escapeXml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Split `k^{2}`, `D_{u}`, `k^2`, `D_u` into runs of normal, superscript and subscript text. */
function parseMarkup(text: string, markup = false): { text: string; shift?: 'super' | 'sub' }[] {
  if (!markup) return [{ text }];
  const out: { text: string; shift?: 'super' | 'sub' }[] = [];
  const re = /([\^_])(\{([^}]*)\}|(.))/g;
  let last = 0;
  for (let m = re.exec(text); m; m = re.exec(text)) {
    if (m.index > last) out.push({ text: text.slice(last, m.index) });
    out.push({ text: m[3] ?? m[4], shift: m[1] === '^' ? 'super' : 'sub' });
    last = m.index + m[0].length;
  }
  if (last < text.length) out.push({ text: text.slice(last) });
  return out;
}

/**
 * One line of SVG text at (x, y) (the baseline), `size` pixels; with `markup`,
 * `^{…}` and `_{…}` become super- and subscripts at 70 % size.
 */
export function svgText(text: string, x: number, y: number, size: number, o: { anchor?: 'start' | 'middle' | 'end'; cls?: string; markup?: boolean; rotate?: number } = {}): string {
  const parts = parseMarkup(text, o.markup).map((p) => (p.shift
    ? `<tspan font-size="${(0.7 * size).toFixed(2)}" baseline-shift="${p.shift}">${escapeXml(p.text)}</tspan>`
    : escapeXml(p.text)));
  const attrs = [`x="${x.toFixed(2)}"`, `y="${y.toFixed(2)}"`, `font-size="${size.toFixed(2)}"`];
  if (o.anchor && o.anchor !== 'start') attrs.push(`text-anchor="${o.anchor}"`);
  if (o.cls) attrs.unshift(`class="${o.cls}"`);
  if (o.rotate) attrs.push(`transform="rotate(${o.rotate} ${x.toFixed(2)} ${y.toFixed(2)})"`);
  return `<text ${attrs.join(' ')}>${parts.join('')}</text>`;
}
