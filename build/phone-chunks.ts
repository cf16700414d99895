import type { Plugin } from 'vite';

/** A route's own code, by the modules it starts from: the page and the parts it always loads with it. */
export type PhoneRoots = Record<string, string[]>;

/** What a module imports, as the bundler's module graph gives it. */
export interface ModuleGraph {
  ids: Iterable<string>;
  importsOf(id: string): readonly string[];
}

/**
 * Each module's group among the phone routes' code: the modules every route named in `roots` reaches by static
 * imports from its roots go to the group `<name>`, and those that more than one route reaches to `shared`.
 * The first script's own modules are left out (the bundler keeps them in it).
 * @example phoneGroups({ join: ['/j.vue'], phone: ['/p.vue'] }, graph).get('/btn.ts') // 'shared', when both import it
 */
export function phoneGroups(roots: PhoneRoots, graph: ModuleGraph): Map<string, string> {
  const ids = [...graph.ids];
  const owners = new Map<string, Set<string>>();
  for (const [route, starts] of Object.entries(roots)) {
    const stack = starts.flatMap((s) => ids.filter((id) => id.endsWith(s)));
    const seen = new Set<string>();
    while (stack.length) {
      const id = stack.pop()!;
      if (seen.has(id)) continue;
      seen.add(id);
      owners.set(id, (owners.get(id) ?? new Set()).add(route));
      stack.push(...graph.importsOf(id));
    }
  }
  return new Map([...owners].map(([id, routes]) => [id, routes.size > 1 ? 'shared' : [...routes][0]!]));
}

/**
 * The phone routes' code in a few files instead of a few dozen: by default the bundler cuts a page's code into
 * one file for each set of pages sharing it, which for the phone page made about 30 small files, and measured with
 * Lighthouse's mobile preset on two cores each one cost a task and a request of its own (docs/benchmark.md). Here
 * each phone route's own code is one file (`phone-<route>`), what the routes share one more (`phone-shared`), so a
 * route loads the first script and two files; the first script's code stays in it, and a facilitator's screen
 * that uses a part the phone uses (a button) loads that part's file.
 *
 * Returns the plugin, which reads the module graph once the build has it, and the bundler's `codeSplitting` groups,
 * which ask the plugin's answer when the chunks are made.
 */
export function phoneChunks(roots: PhoneRoots): { plugin: Plugin; groups: { name: string; test: (id: string) => boolean; priority: number; tags?: ['$initial'] }[] } {
  let group = new Map<string, string>();
  const plugin: Plugin = {
    name: 'cairn-phone-chunks',
    apply: 'build',
    buildEnd() {
      group = phoneGroups(roots, {
        ids: this.getModuleIds(),
        importsOf: (id) => this.getModuleInfo(id)?.importedIds ?? [],
      });
    },
  };
  const groups = [
    // The first script's modules (those the entry imports statically) stay in it, whatever the groups below reach.
    { name: 'index', test: () => true, priority: 4, tags: ['$initial'] as ['$initial'] },
    { name: 'phone-shared', test: (id: string) => group.get(id) === 'shared', priority: 3 },
    ...Object.keys(roots).map((route) => ({ name: `phone-${route}`, test: (id: string) => group.get(id) === route, priority: 2 })),
  ];
  return { plugin, groups };
}
