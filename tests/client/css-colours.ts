import fs from 'node:fs';
import path from 'node:path';
import postcss, { type Rule } from 'postcss';
import { cssVariables, LIGHT, QUASAR_BRAND } from '../../src/theme/palette';

/** One text colour over one background as a stylesheet of Cairn's sets them, with what makes the text large. */
export interface CssPair {
  fg: string;
  bg: string;
  /** The file and selector(s) the pair comes from. */
  where: string;
  /** WCAG 2.2 "large scale" text: at least 24 px, or 18.66 px and bold. */
  large: boolean;
}

/** Every `.vue` and `.css` file under `src/`. */
export function styleFiles(root = 'src'): string[] {
  return fs.readdirSync(root, { recursive: true, encoding: 'utf8' })
    .filter((f) => f.endsWith('.vue') || f.endsWith('.css'))
    .map((f) => path.join(root, f))
    .sort();
}

/** The CSS of a file: a stylesheet as it is, a component's `<style>` blocks joined. */
export function cssOf(file: string): string {
  const text = fs.readFileSync(file, 'utf8');
  if (file.endsWith('.css')) return text;
  return [...text.matchAll(/<style[^>]*>([\s\S]*?)<\/style>/g)].map((m) => m[1]).join('\n');
}

const VARS = cssVariables();

/** The palette colour a declared value resolves to, or null for anything else (transparent, rgba, inherit, an image). */
export function resolveColour(value: string): string | null {
  const m = /^var\((--cairn-[\w-]+)\)$/.exec(value.trim());
  return m ? (VARS[m[1]!] ?? null) : null;
}

function px(size: string | undefined): number {
  if (!size) return 0;
  const m = /^([\d.]+)(px|rem)$/.exec(size.trim());
  if (!m) return 0;
  return Number(m[1]) * (m[2] === 'rem' ? 16 : 1);
}

interface Styled {
  selector: string;
  fg: string | null;
  bg: string | null;
  size: number;
  bold: boolean;
}

/**
 * The text/background pairs a file's CSS sets: a rule that sets both, and a rule that sets only a text
 * colour under an ancestor selector whose rule in the same file sets the background
 * (`.card { background } .card .title { color }`).
 */
export function pairsOf(file: string): CssPair[] {
  const rules: Styled[] = [];
  postcss.parse(cssOf(file)).walkRules((rule: Rule) => {
    const d: Record<string, string> = {};
    rule.walkDecls((decl) => {
      d[decl.prop] = decl.value;
    });
    const bg = d['background-color'] ?? d.background;
    const weight = d['font-weight'];
    rules.push({
      selector: rule.selector,
      fg: d.color ? resolveColour(d.color) : null,
      bg: bg ? resolveColour(bg) : null,
      size: px(d['font-size']),
      bold: weight === 'bold' || Number(weight) >= 700,
    });
  });
  const large = (r: Styled) => r.size >= 24 || (r.size >= 18.66 && r.bold);
  const out: CssPair[] = [];
  const name = file.replace(/\\/g, '/');
  for (const r of rules) {
    if (r.fg && r.bg) out.push({ fg: r.fg, bg: r.bg, where: `${name} ${r.selector}`, large: large(r) });
    if (!r.fg || r.bg) continue;
    for (const selector of r.selector.split(',').map((s) => s.trim())) {
      const parts = selector.split(/\s*[\s>]\s*/);
      for (let k = 1; k < parts.length; k++) {
        const ancestor = parts.slice(0, k).join(' ');
        for (const a of rules) {
          if (!a.bg || !a.selector.split(',').map((s) => s.trim()).includes(ancestor)) continue;
          out.push({ fg: r.fg, bg: a.bg, where: `${name} ${selector} inside ${ancestor}`, large: large(r) });
        }
      }
    }
  }
  return out;
}

/** Every text colour a file's CSS sets (resolved through the palette). */
export function textColoursOf(file: string): { colour: string; where: string }[] {
  const out: { colour: string; where: string }[] = [];
  postcss.parse(cssOf(file)).walkDecls('color', (decl) => {
    const colour = resolveColour(decl.value);
    if (colour) out.push({ colour, where: `${file} ${(decl.parent as Rule).selector}` });
  });
  return out;
}

/** Quasar's colour classes (`.text-red-1`, `.bg-negative`, …) as its stylesheet declares them, brand colours resolved through the palette. */
function quasarClassColours(): Map<string, string> {
  const out = new Map<string, string>();
  const css = fs.readFileSync('node_modules/quasar/dist/quasar.css', 'utf8');
  postcss.parse(css).walkRules(/^\.(text|bg)-[a-z0-9-]+$/, (rule) => {
    rule.walkDecls(/^(color|background)$/, (decl) => {
      const value = decl.value.replace(/\s*!important$/, '').trim();
      const brand = /^var\(--q-([a-z]+)\)$/.exec(value);
      const colour = brand ? (QUASAR_BRAND as Record<string, string>)[brand[1]!] : /^#[0-9a-f]{3,6}$/i.test(value) ? value : undefined;
      if (colour) out.set(rule.selector.slice(1), colour.length === 4 ? `#${[...colour.slice(1)].map((c) => c + c).join('')}` : colour);
    });
  });
  return out;
}

let quasarColours: Map<string, string> | null = null;

/**
 * The pairs a template sets with Quasar's colour classes on one element (`class="bg-red-1 text-negative"`);
 * a background class alone pairs with the page's text colour, which the element inherits.
 */
export function classPairsOf(file: string): CssPair[] {
  if (!file.endsWith('.vue')) return [];
  quasarColours ??= quasarClassColours();
  const colours = quasarColours;
  const template = fs.readFileSync(file, 'utf8').replace(/<(script|style)[^>]*>[\s\S]*?<\/\1>/g, '');
  const out: CssPair[] = [];
  for (const m of template.matchAll(/\sclass="([^"]*)"/g)) {
    const classes = m[1]!.split(/\s+/);
    const bg = classes.map((c) => (c.startsWith('bg-') ? colours.get(c) : undefined)).find(Boolean);
    if (!bg) continue;
    const fg = classes.map((c) => (c.startsWith('text-') ? colours.get(c) : undefined)).find(Boolean) ?? LIGHT.text;
    out.push({ fg, bg, where: `${file} class="${m[1]}"`, large: false });
  }
  return out;
}
