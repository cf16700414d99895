import { describe, expect, it } from 'vitest';
import { ClientError } from '../../src/api/errors';
import { useLoad } from '../../src/composables/useLoad';

/** A promise the test settles by hand. */
function deferred<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

describe('useLoad', () => {
  it('loads at once: loading while it waits, then the data and no error', async () => {
    const d = deferred<string[]>();
    const l = useLoad(() => d.promise, 'Could not load');
    expect(l.loading.value).toBe(true);
    expect(l.data.value).toBeUndefined();
    d.resolve(['a', 'b']);
    await d.promise;
    await Promise.resolve();
    expect(l.loading.value).toBe(false);
    expect(l.data.value).toEqual(['a', 'b']);
    expect(l.error.value).toBeNull();
  });

  it('keeps a client error as it is, with its code, status and fields', async () => {
    const refused = new ClientError('forbidden', 'You may not see this workshop', 403);
    const l = useLoad(() => Promise.reject(refused), 'Could not load');
    await l.reload();
    expect(l.error.value).toBe(refused);
    expect(l.loading.value).toBe(false);
  });

  it('turns anything else thrown into a client error with the fallback message', async () => {
    const l = useLoad(async () => {
      throw new TypeError('x is undefined');
    }, () => 'Could not load the report');
    await l.reload();
    expect(l.error.value).toBeInstanceOf(ClientError);
    expect(l.error.value?.code).toBe('internal');
    expect(l.error.value?.message).toBe('Could not load the report');
  });

  it('waits for reload() when not immediate, and a working reload clears the last error but keeps older data until then', async () => {
    let fail = true;
    let calls = 0;
    const l = useLoad(async () => {
      calls += 1;
      if (fail) throw new ClientError('network', 'Cairn cannot reach the server');
      return calls;
    }, 'Could not load', { immediate: false });
    expect(calls).toBe(0);
    expect(l.loading.value).toBe(false);
    await l.reload();
    expect(l.error.value?.lost).toBe(true);
    fail = false;
    await l.reload();
    expect(l.error.value).toBeNull();
    expect(l.data.value).toBe(2);
  });

  it('keeps only the latest of overlapping loads, whatever order they answer in', async () => {
    const first = deferred<string>();
    const second = deferred<string>();
    const answers = [first.promise, second.promise];
    const l = useLoad(() => answers.shift()!, 'Could not load', { immediate: false });
    const a = l.reload();
    const b = l.reload();
    second.resolve('new');
    await b;
    expect(l.loading.value).toBe(false);
    first.resolve('old');
    await a;
    expect(l.data.value).toBe('new');
    expect(l.loading.value).toBe(false);
  });
});
