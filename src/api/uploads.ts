import { ClientError, errorOfResponse } from './errors';
import type { PhotoUploadAnswer } from '../../shared/schemas/activities';

/** What a photo upload sends besides the file (multipart fields are strings on the wire). */
export interface PhotoUpload {
  itemId: string;
  clientId: string;
  caption: string;
  showsPeople: boolean;
  peopleConsent: boolean;
}

/** The token a screen reads photos with: an account's (through its workshop) or a participant's or projector's. */
export interface PhotoToken {
  token: string;
  /** Set for accounts: photos are read through the workshop they have a role on. */
  workshopId: string | null;
}

/**
 * Uploads a photo from a phone with its participant token (the HTTP client sends account tokens
 * only); a retry with the same clientId answers with the first upload.
 */
export async function uploadPhoto(participantToken: string, upload: PhotoUpload, file: Blob, fileName: string): Promise<PhotoUploadAnswer> {
  const form = new FormData();
  form.set('itemId', upload.itemId);
  form.set('clientId', upload.clientId);
  form.set('caption', upload.caption);
  form.set('showsPeople', String(upload.showsPeople));
  form.set('peopleConsent', String(upload.peopleConsent));
  form.set('photo', file, fileName);
  let res: Response;
  try {
    res = await fetch('/api/live/photos', { method: 'POST', headers: { Authorization: `Bearer ${participantToken}` }, body: form });
  } catch {
    throw new ClientError('network', 'The photo could not be sent; check the connection and try again');
  }
  if (!res.ok) throw await errorOfResponse(res, 'The photo could not be sent');
  return (await res.json()) as PhotoUploadAnswer;
}

/** A photo as an object URL (fetched with a token, since an <img> cannot send one). */
export async function photoObjectUrl(photoId: string, size: 'thumb' | 'full', who: PhotoToken): Promise<string> {
  const id = encodeURIComponent(photoId);
  const path = who.workshopId ? `/api/workshops/${encodeURIComponent(who.workshopId)}/photos/${id}` : `/api/live/photos/${id}`;
  const res = await fetch(`${path}?size=${size}`, { headers: { Authorization: `Bearer ${who.token}` } });
  if (!res.ok) throw await errorOfResponse(res, 'The photo could not be loaded');
  return URL.createObjectURL(await res.blob());
}
