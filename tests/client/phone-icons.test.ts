import { describe, expect, it } from 'vitest';
import * as mdi from '@quasar/extras/mdi-v7';
import svgMdiV7 from 'quasar/icon-set/svg-mdi-v7';
import * as phoneIcons from '../../src/theme/phone-icons';

// The phone's icons are copies of @quasar/extras/mdi-v7's path data (src/theme/phone-icons.ts says why).
describe('the phone icons', () => {
  const copies = Object.entries(phoneIcons).filter(([name]) => name.startsWith('mdi'));

  it('are the package drawings they are named after', () => {
    expect(copies.length).toBeGreaterThan(0);
    for (const [name, path] of copies) expect(path, name).toBe((mdi as Record<string, string>)[name]);
  });

  it('give the field and chip icons of Quasar MDI set', () => {
    const set = svgMdiV7 as unknown as Record<string, Record<string, string>>;
    expect(phoneIcons.phoneIconSet.field).toEqual({ clear: set.field!.clear, error: set.field!.error });
    expect(phoneIcons.phoneIconSet.chip).toEqual({ remove: set.chip!.remove, selected: set.chip!.selected });
  });
});
