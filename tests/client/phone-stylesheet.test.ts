import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { composedClasses, phoneStylesheet } from '../../build/phone-stylesheet';

const read = (file: string) => fs.readFileSync(new URL(`../../node_modules/${file}`, import.meta.url), 'utf8');

describe('the phone stylesheet (the route shells carry it instead of the whole one)', () => {
  it('keeps the rules whose classes the code names, in their order, and drops the rest', async () => {
    const css =
      '@font-face{font-family:"Source Sans 3";src:url(/a.woff2)}' +
      'html,body{margin:0}.q-btn{padding:4px}.q-table{width:100%}.cairn-phone .q-btn,.q-table td{color:red}' +
      '@media (min-width:600px){.q-btn{padding:8px}.q-table{width:50%}}.q-field--float{top:0}';
    const code = ['h("button",{class:"q-btn"});', 'const f=`q-field--${e}`,e="float";'];
    const out = await phoneStylesheet(css, code);
    // @font-face and the root elements stay; the table's rules go, and so does the selector that names it.
    expect(out).toContain('@font-face');
    expect(out).toMatch(/html,\s*body\s*\{/);
    expect(out).not.toContain('q-table');
    expect(out).not.toContain('cairn-phone');
    expect(out.indexOf('.q-btn{padding:4px}')).toBeGreaterThan(-1);
    expect(out).toMatch(/@media \(min-width:600px\)\s*\{\s*\.q-btn\{padding:8px\}\s*\}/);
    // Composed at run time from a prefix and a word that the code both hold.
    expect(out).toContain('.q-field--float{top:0}');
  });

  it('finds the classes the component library composes from a prefix and a value in the code', () => {
    const words = new Set(['q-btn--', 'flat', 'text-', 'primary', 'col-', 'xs', '6']);
    expect(composedClasses(['q-btn--flat', 'q-btn--push', 'text-primary', 'text-negative', 'col-xs-6', 'q-btn'], words)).toEqual([
      'q-btn--flat',
      'text-primary',
      'col-xs-6',
    ]);
  });

  it("keeps what Quasar's own button builds while it runs, from the library's own stylesheet and code", async () => {
    const css = read('quasar/dist/quasar.prod.css');
    // The button's code as the library ships it (its classes put together in template strings), and a page
    // that asks for a flat primary button.
    const code = [read('quasar/src/components/btn/QBtn.js'), read('quasar/src/components/btn/use-btn.js'), 'h(QBtn,{flat:!0,color:"primary"})'];
    const out = await phoneStylesheet(css, code);
    for (const cls of ['q-btn', 'q-btn--flat', 'q-btn--rectangle', 'q-btn--actionable', 'q-btn--rounded', 'text-primary', 'bg-primary']) {
      expect(out, cls).toMatch(new RegExp(`\\.${cls}[^a-z0-9_-]`));
    }
    for (const cls of ['q-table', 'q-tree', 'q-carousel', 'q-editor']) expect(out, cls).not.toContain(`.${cls}`);
    expect(out.length).toBeLessThan(css.length / 3);
  });
});
