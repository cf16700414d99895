import { http, type TokenSource } from './http';
import { ClientError, errorOfBody } from './errors';
import type {
  ExportFile,
  MyData,
  ReportRecipients,
  RetentionStatus,
  SendReportAnswer,
  SendReportBody,
  WorkshopResults,
} from '../../shared/schemas/results';

const w = (id: string) => `/workshops/${encodeURIComponent(id)}`;

/** Options of a download: names removed, and (CSV) a byte-order mark for spreadsheets. */
export interface DownloadOptions {
  anonymize?: boolean;
  bom?: boolean;
  /** Keep text that starts like a formula exactly as written (neutralised otherwise). */
  raw?: boolean;
  /** The sessions covered: `day` (the default), `all`, or session ids separated by commas. */
  sessions?: string;
}

function query(o: DownloadOptions): string {
  const q = new URLSearchParams();
  if (o.anonymize) q.set('anonymize', 'true');
  if (o.bom) q.set('bom', 'true');
  if (o.raw) q.set('raw', 'true');
  if (o.sessions && o.sessions !== 'day') q.set('sessions', o.sessions);
  const s = q.toString();
  return s ? `?${s}` : '';
}

/** The file name the server gave a download (Content-Disposition), or a fallback. */
function fileNameOf(res: Response, fallback: string): string {
  const header = res.headers.get('Content-Disposition') ?? '';
  const star = /filename\*=UTF-8''([^;]+)/i.exec(header);
  if (star) return decodeURIComponent(star[1]!);
  const plain = /filename="?([^";]+)"?/i.exec(header);
  return plain ? plain[1]! : fallback;
}

/** Fetches a file with the signed-in person's token (a link cannot send one) and hands it to the browser as a download. */
async function fetchFile(path: string, token: string | null, fallback: string): Promise<{ blob: Blob; fileName: string }> {
  let res: Response;
  try {
    res = await fetch(`/api${path}`, { headers: token ? { Authorization: `Bearer ${token}` } : {}, credentials: 'same-origin' });
  } catch {
    throw new ClientError('network', 'Cairn cannot reach the server; check the connection and try again');
  }
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
    throw new ClientError('internal', body?.error?.message ?? `The server answered ${res.status}`, res.status);
  }
  return { blob: await res.blob(), fileName: fileNameOf(res, fallback) };
}

/** Saves a blob under a file name through a temporary link. */
export function saveBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  document.body.appendChild(a);
  a.click();
  a.remove();
  // Give the browser time to start the download before the URL goes.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** Results, exports, the report, sending it and personal data: the calls of the pages after the workshop. */
export const resultsApi = {
  results: (workshopId: string, anonymize = false, sessions = 'day') => http.get<WorkshopResults>(`${w(workshopId)}/results${query({ anonymize, sessions })}`),
  recipients: (workshopId: string) => http.get<ReportRecipients>(`${w(workshopId)}/report/recipients`),
  send: (workshopId: string, body: SendReportBody) => http.post<SendReportAnswer>(`${w(workshopId)}/report/send`, body),
  retention: (workshopId: string) => http.get<RetentionStatus>(`${w(workshopId)}/retention`),
  setRetention: (workshopId: string, retentionDays: number | null) => http.put<RetentionStatus>(`${w(workshopId)}/retention`, { retentionDays }),
  deleteNow: (workshopId: string) => http.post<RetentionStatus>(`${w(workshopId)}/retention/delete-now`, { confirm: true }),

  /** Downloads one export file (a CSV table or the complete JSON). */
  async downloadExport(tokens: TokenSource, workshopId: string, file: ExportFile, o: DownloadOptions = {}): Promise<void> {
    const path = `${w(workshopId)}/exports/${file}${query(o)}`;
    let got = await fetchFile(path, tokens.token(), file).catch(async (err: unknown) => {
      // An expired access token is renewed once, as the JSON client does.
      if (err instanceof ClientError && err.status === 401 && (await tokens.renew())) return null;
      throw err;
    });
    got ??= await fetchFile(path, tokens.token(), file);
    saveBlob(got.blob, got.fileName);
  },

  /** Downloads the report as a PDF made on the server. */
  async downloadPdf(tokens: TokenSource, workshopId: string, o: DownloadOptions = {}): Promise<void> {
    const path = `${w(workshopId)}/report.pdf${query({ anonymize: o.anonymize, sessions: o.sessions })}`;
    let got = await fetchFile(path, tokens.token(), 'report.pdf').catch(async (err: unknown) => {
      if (err instanceof ClientError && err.status === 401 && (await tokens.renew())) return null;
      throw err;
    });
    got ??= await fetchFile(path, tokens.token(), 'report.pdf');
    saveBlob(got.blob, got.fileName);
  },

  /** A photo thumbnail as an object URL (an <img> cannot send the token); the caller revokes it. */
  async photoObjectUrl(apiPath: string, token: string | null): Promise<string> {
    const { blob } = await fetchFile(apiPath.replace(/^\/api/, ''), token, 'photo.jpg');
    return URL.createObjectURL(blob);
  },
};

/** What a participant's phone does about their own data (with the participant token). */
export const myDataApi = {
  async call<T>(method: 'GET' | 'PUT' | 'DELETE', path: string, token: string, body?: unknown): Promise<T> {
    const res = await fetch(`/api/participant/${path}`, {
      method,
      headers: { Authorization: `Bearer ${token}`, Accept: 'application/json', ...(body === undefined ? {} : { 'Content-Type': 'application/json' }) },
      body: body === undefined ? undefined : JSON.stringify(body),
    }).catch(() => {
      throw new ClientError('network', 'Cairn cannot reach the server; check the connection and try again');
    });
    const data = (await res.json().catch(() => null)) as T | null;
    if (!res.ok) throw errorOfBody(res.status, data, `The server answered ${res.status}`);
    return data as T;
  },
  get: (token: string) => myDataApi.call<MyData>('GET', 'data', token),
  setEmail: (token: string, email: string | null) => myDataApi.call<MyData>('PUT', 'report-email', token, { email }),
  removeNotes: (token: string) => myDataApi.call<{ removed: number }>('DELETE', 'notes', token),
};
