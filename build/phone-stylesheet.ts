import { PurgeCSS } from 'purgecss';

/**
 * The words a piece of built code holds (runs of letters, digits, `_` and `-`): PurgeCSS's own default
 * extractor, applied to the minified scripts a phone runs.
 */
function wordsOf(code: string): Set<string> {
  return new Set(code.match(/[A-Za-z0-9_-]+/g) ?? []);
}

/** Every class name a stylesheet's selectors name (`.q-btn--flat` → `q-btn--flat`). */
function classesOf(css: string): Set<string> {
  const names = new Set<string>();
  // Selectors only: skip the declarations between braces (`.5rem` and the like are not classes).
  for (const selectors of css.replace(/\{[^{}]*\}/g, '{}').split(/[{}]/)) {
    for (const m of selectors.matchAll(/\.((?:[A-Za-z0-9_-]|\\.)+)/g)) names.add(m[1]!.replace(/\\/g, ''));
  }
  return names;
}

/**
 * The classes the component library puts together while it runs: a prefix written in the code
 * (`q-btn--${design}`, `text-${color}`, `col-${…}` leave the word `q-btn--`, `text-`, `col-`) followed by one
 * or two words that the same code holds (`flat`, `primary`, `auto`; a prop's value in a page's template).
 * @example composedClasses(new Set(['q-btn--flat', 'text-red']), new Set(['q-btn--', 'flat'])) // ['q-btn--flat']
 */
export function composedClasses(classes: Iterable<string>, words: Set<string>): string[] {
  const prefixes = [...words].filter((w) => w.endsWith('-') && w.length >= 2);
  const isWord = (rest: string): boolean =>
    words.has(rest) || [...rest.matchAll(/-/g)].some((m) => words.has(rest.slice(0, m.index)) && words.has(rest.slice(m.index + 1)));
  return [...classes].filter((c) => !words.has(c) && prefixes.some((p) => c.length > p.length && c.startsWith(p) && isWord(c.slice(p.length))));
}

/**
 * The whole stylesheet cut to the rules a phone's screens can use: PurgeCSS keeps each rule whose
 * selectors' classes, elements and attribute values all appear in `code` (the scripts the phone's routes
 * can load, the component library's among them), plus the classes the component library composes at run
 * time ({@link composedClasses}). `@font-face`, keyframes and custom properties stay whole; the rules keep
 * the whole stylesheet's order, so anything the phone shows cascades as it does with the whole one.
 */
export async function phoneStylesheet(css: string, code: string[]): Promise<string> {
  const words = wordsOf(code.join('\n'));
  const composed = composedClasses(classesOf(css), words);
  const [result] = await new PurgeCSS().purge({
    content: [{ raw: code.join('\n'), extension: 'js' }],
    css: [{ raw: css }],
    defaultExtractor: (content) => [...wordsOf(content)],
    // The page's root elements, and the classes Quasar's Platform, Screen and Dark plugins put on <body> from
    // strings the code builds (`platform-${name}`, `body--${dark ? 'dark' : 'light'}`) are caught above.
    safelist: { standard: ['html', 'body', ':root', ...composed] },
  });
  return result!.css;
}
