import { describe, expect, it } from 'vitest';
import { ESLint } from 'eslint';

// Lints one forbidden import of each of the architecture's "nevers" (DEVELOPERS.md) under a file
// name where it is forbidden, and one allowed import, so a change to eslint.config.js that drops a
// rule (or lets a later block override it) fails here.
const eslint = new ESLint();

async function restricted(filePath: string, source: string): Promise<boolean> {
  const [result] = await eslint.lintText(`${source}\nexport const x = y;\n`, { filePath });
  return result!.messages.some((m) => m.ruleId === 'no-restricted-imports');
}

describe('import boundaries', () => {
  const forbidden: [string, string, string][] = [
    ['shared imports no server', 'shared/example.ts', "import { y } from '../server/app';"],
    ['shared imports no Node module', 'shared/example.ts', "import { y } from 'node:fs';"],
    ['the client imports no server', 'src/pages/example.vue.ts', "import { y } from '../../server/app';"],
    ['a service imports no handler', 'server/features/voting/voting.service.ts', "import { y } from './voting.socket';"],
    ['a router imports no other router', 'server/features/members/members.router.ts', "import { y } from '../auth/auth.router';"],
    ['a router imports no router of its own feature', 'server/features/live/sessions.router.ts', "import { y } from './live.router';"],
    ['the database layer reaches into no feature', 'server/db/seed.ts', "import { y } from '../features/auth/auth.service';"],
    ['auth imports nothing of users', 'server/features/auth/auth.router.ts', "import { y } from '../users/users.service';"],
    ['users imports nothing of auth', 'server/features/users/users.router.ts', "import { y } from '../auth/auth.service';"],
    ['an auth service keeps the service rule too', 'server/features/auth/auth.service.ts', "import { y } from './auth.router';"],
    ['a users router keeps the router rule too', 'server/features/users/users.router.ts', "import { y } from '../members/members.router';"],
  ];
  for (const [name, file, source] of forbidden) {
    it(name, async () => expect(await restricted(file, source)).toBe(true));
  }

  const allowed: [string, string, string][] = [
    ['a router imports its service', 'server/features/auth/auth.router.ts', "import { y } from './auth.service';"],
    ['a router imports server/common', 'server/features/members/members.router.ts', "import { y } from '../../common/session-cookie';"],
    ['the database layer imports server/common', 'server/db/seed.ts', "import { y } from '../common/passwords';"],
    ['the client imports shared', 'src/pages/example.vue.ts', "import { y } from '../../shared/tally';"],
  ];
  for (const [name, file, source] of allowed) {
    it(name, async () => expect(await restricted(file, source)).toBe(false));
  }
});
