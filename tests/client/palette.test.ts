import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cssVariables, LIGHT, PROJECTOR } from '../../src/theme/palette';

/** Every source file of the client but the palette itself. */
const files = fs.readdirSync('src', { recursive: true, encoding: 'utf8' })
  .filter((f) => /\.(vue|css|ts)$/.test(f))
  .map((f) => path.join('src', f))
  .filter((f) => !f.endsWith(path.join('theme', 'palette.ts')));

describe('one palette: colours come from src/theme/palette.ts', () => {
  it('no component, stylesheet or script of the client writes a hex colour of its own', () => {
    const found: string[] = [];
    for (const file of files) {
      const text = fs.readFileSync(file, 'utf8');
      const isCode = file.endsWith('.ts');
      const styles = file.endsWith('.css') ? [text] : [...text.matchAll(/<style[^>]*>([\s\S]*?)<\/style>/g)].map((m) => m[1]!);
      // In a style: any #rgb, #rgba, #rrggbb or #rrggbbaa. In a template or a script: one inside quotes
      // (`fill="#fff"`, `'#0b5d5b'`), so a slot shorthand such as `#add` is not taken for a colour.
      for (const css of styles) for (const m of css.matchAll(/#(?:[0-9a-f]{8}|[0-9a-f]{6}|[0-9a-f]{3,4})\b/gi)) found.push(`${file}: ${m[0]}`);
      const rest = isCode || file.endsWith('.vue') ? text.replace(/<style[^>]*>[\s\S]*?<\/style>/g, '') : '';
      for (const m of rest.matchAll(/["'`]#(?:[0-9a-f]{8}|[0-9a-f]{6}|[0-9a-f]{3,4})["'`]/gi)) found.push(`${file}: ${m[0]}`);
    }
    expect(found, 'use var(--cairn-…) in CSS, or LIGHT / PROJECTOR from src/theme/palette.ts in code').toEqual([]);
  });

  it('the HTML shell and the web app manifest take their colours from the palette too', () => {
    expect(fs.readFileSync('index.html', 'utf8').match(/#[0-9a-f]{6}\b|#[0-9a-f]{3}\b/gi)).toBeNull();
    expect(fs.readFileSync('vite.config.ts', 'utf8').match(/['"]#[0-9a-f]{3,8}['"]/gi)).toBeNull();
  });

  it('every var(--cairn-…) the client uses is one the palette defines', () => {
    const defined = new Set(Object.keys(cssVariables()));
    const unknown: string[] = [];
    for (const file of files) {
      for (const m of fs.readFileSync(file, 'utf8').matchAll(/var\((--cairn-[\w-]+)/g)) if (!defined.has(m[1]!)) unknown.push(`${file}: ${m[1]}`);
    }
    expect(unknown).toEqual([]);
  });

  it('derives one variable a colour, light ones plain and the projector\'s prefixed', () => {
    const vars = cssVariables();
    expect(vars['--cairn-primary']).toBe(LIGHT.primary);
    expect(vars['--cairn-primary-dark']).toBe(LIGHT.primaryDark);
    expect(vars['--cairn-projector-background']).toBe(PROJECTOR.background);
    expect(Object.keys(vars)).toHaveLength(Object.keys(LIGHT).length + Object.keys(PROJECTOR).length);
  });
});
