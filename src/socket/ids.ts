/**
 * A random id for client-made things (submission ids, device ids). Uses getRandomValues, which
 * works on plain-HTTP pages too (phones reach a venue laptop without TLS; randomUUID needs a secure context).
 * @example newId() // 'k3v9x0c1...'
 */
export function newId(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** This device's id, kept in local storage so rejoining finds the same participant. */
export function deviceId(): string {
  const key = 'cairn.device';
  let id = localStorage.getItem(key);
  if (!id) {
    id = newId();
    localStorage.setItem(key, id);
  }
  return id;
}
