import { describe, expect, it } from 'vitest';
import { phoneGroups, type ModuleGraph } from '../../build/phone-chunks';

/** A module graph from a list of static imports. */
function graph(imports: Record<string, string[]>): ModuleGraph {
  const ids = new Set([...Object.keys(imports), ...Object.values(imports).flat()]);
  return { ids, importsOf: (id) => imports[id] ?? [] };
}

describe("the phone routes' code in a file a route and one they share", () => {
  const modules = graph({
    '/app/src/pages/join.vue': ['/app/src/pages/join.vue?vue&type=style&index=0&lang.css', '/app/quasar/QInput.js', '/app/quasar/QBtn.js'],
    '/app/src/pages/phone.vue': ['/app/quasar/QBtn.js', '/app/src/stores/live.ts'],
    '/app/src/components/VotePhone.vue': ['/app/src/stores/voting.ts', '/app/src/stores/live.ts'],
    '/app/src/stores/live.ts': ['/app/socket.io-client/index.js'],
    '/app/quasar/QBtn.js': ['/app/quasar/ripple.js'],
    '/app/src/pages/plan.vue': ['/app/quasar/QBtn.js', '/app/charts/index.js'],
  });
  const groups = phoneGroups({ join: ['/src/pages/join.vue'], phone: ['/src/pages/phone.vue', '/src/components/VotePhone.vue'] }, modules);

  it("puts each route's own modules, followed through every static import, in the route's group", () => {
    expect(groups.get('/app/src/pages/join.vue')).toBe('join');
    expect(groups.get('/app/src/pages/join.vue?vue&type=style&index=0&lang.css')).toBe('join');
    expect(groups.get('/app/quasar/QInput.js')).toBe('join');
    expect(groups.get('/app/src/pages/phone.vue')).toBe('phone');
    // A second root of the same route (an activity input the page always loads) and what it reaches.
    expect(groups.get('/app/src/stores/voting.ts')).toBe('phone');
    expect(groups.get('/app/socket.io-client/index.js')).toBe('phone');
  });

  it('puts what both routes reach in the shared group, with everything it imports', () => {
    expect(groups.get('/app/quasar/QBtn.js')).toBe('shared');
    expect(groups.get('/app/quasar/ripple.js')).toBe('shared');
  });

  it("leaves every module no phone route reaches to the bundler's own cutting", () => {
    expect(groups.has('/app/src/pages/plan.vue')).toBe(false);
    expect(groups.has('/app/charts/index.js')).toBe(false);
  });
});
