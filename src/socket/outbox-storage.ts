import { createStore, del, get, set, type UseStore } from 'idb-keyval';
import { MemoryOutboxStorage, type OutboxItem, type OutboxStorage } from './outbox';

/**
 * The phone outbox's store in IndexedDB (idb-keyval): the list under `list:<key>`, a photo's bytes
 * under `file:<clientId>` (a Blob, which IndexedDB keeps as it is), so a photo waiting for the
 * connection survives a reload. Without IndexedDB (some private modes) it keeps them in memory.
 */
export function browserOutboxStorage(): OutboxStorage {
  if (typeof indexedDB === 'undefined') return new MemoryOutboxStorage();
  let db: UseStore;
  try {
    db = createStore('cairn-outbox', 'outbox');
  } catch {
    return new MemoryOutboxStorage();
  }
  return {
    load: async (key) => (await get<OutboxItem[]>(`list:${key}`, db)) ?? [],
    save: (key, items) => (items.length ? set(`list:${key}`, items, db) : del(`list:${key}`, db)),
    putFile: (clientId, file) => set(`file:${clientId}`, file, db),
    getFile: (clientId) => get<Blob>(`file:${clientId}`, db),
    deleteFile: (clientId) => del(`file:${clientId}`, db),
  };
}
