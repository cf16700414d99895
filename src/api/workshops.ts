import { http } from './http';
import type { CreateWorkshopBody, UpdateWorkshopBody, Workshop, WorkshopSummary } from '../../shared/schemas/workshop';
import type { ActivityType, AgendaItem, AgendaItemInput } from '../../shared/schemas/agenda-item';
import type { PackingLine } from '../../shared/materials';
import { newAgendaItem } from '../../shared/activities';

const w = (id: string) => `/workshops/${encodeURIComponent(id)}`;

/** Workshop, agenda and packing-list calls. */
export const workshopsApi = {
  templates: () => http.get<{ id: 'full-day' | 'half-day'; name: string; description: string; itemCount: number }[]>('/templates'),
  list: () => http.get<WorkshopSummary[]>('/workshops'),
  get: (id: string) => http.get<Workshop>(w(id)),
  create: (body: CreateWorkshopBody) => http.post<Workshop>('/workshops', body),
  update: (id: string, body: UpdateWorkshopBody) => http.patch<Workshop>(w(id), body),
  remove: (id: string) => http.delete(w(id)),
  /** Adds an item of a type with the library's defaults, titled with the type's name in the screen's language when given. */
  addItem: (id: string, type: ActivityType, position?: number, title?: string) => {
    const { id: _id, ...defaults } = newAgendaItem(type, 'new');
    return http.post<AgendaItem>(`${w(id)}/agenda`, { type, position, ...(title ? { item: { ...defaults, title } } : {}) });
  },
  updateItem: (id: string, itemId: string, item: AgendaItemInput) =>
    http.put<AgendaItem>(`${w(id)}/agenda/${encodeURIComponent(itemId)}`, item),
  duplicateItem: (id: string, itemId: string) =>
    http.post<AgendaItem>(`${w(id)}/agenda/${encodeURIComponent(itemId)}/duplicate`),
  removeItem: (id: string, itemId: string) => http.delete(`${w(id)}/agenda/${encodeURIComponent(itemId)}`),
  reorder: (id: string, ids: string[]) => http.put<AgendaItem[]>(`${w(id)}/agenda-order`, { ids }),
  materials: (id: string) => http.get<{ lines: PackingLine[]; packed: string[] }>(`${w(id)}/materials`),
  setPacked: (id: string, keys: string[]) => http.put<{ packed: string[] }>(`${w(id)}/materials/packed`, { keys }),
};
