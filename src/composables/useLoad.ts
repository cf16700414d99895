import { ref, shallowRef, type Ref, type ShallowRef } from 'vue';
import { clientErrorOf, type ClientError } from '../api/errors';

/** What `useLoad` gives a screen: the data, whether a load is under way, the one client error of the last load, and a way to load again. */
export interface Load<T> {
  /** The last load's result (undefined until one has worked). */
  data: ShallowRef<T | undefined>;
  loading: Ref<boolean>;
  /** The last load's failure (null once a load works). */
  error: ShallowRef<ClientError | null>;
  /** Loads again; resolves once it has worked or failed (it never rejects). */
  reload: () => Promise<void>;
}

/**
 * Loads what a page or panel shows, once at once (unless `immediate: false`) and again on `reload()`, keeping
 * `loading`, `data` and `error` (the one `ClientError`; anything else thrown becomes one with the fallback
 * message). When loads overlap only the latest one's outcome is kept.
 * @example const { data: workshops, loading, error } = useLoad(() => workshopsApi.list(), 'Could not load your workshops');
 */
export function useLoad<T>(load: () => Promise<T>, fallback: string | (() => string), options: { immediate?: boolean } = {}): Load<T> {
  const data = shallowRef<T | undefined>(undefined);
  const loading = ref(false);
  const error = shallowRef<ClientError | null>(null);
  let latest = 0;

  async function reload(): Promise<void> {
    const mine = ++latest;
    loading.value = true;
    try {
      const value = await load();
      if (mine !== latest) return;
      data.value = value;
      error.value = null;
    } catch (err) {
      if (mine !== latest) return;
      error.value = clientErrorOf(err, typeof fallback === 'function' ? fallback() : fallback);
    } finally {
      if (mine === latest) loading.value = false;
    }
  }

  if (options.immediate !== false) void reload();
  return { data, loading, error, reload };
}
