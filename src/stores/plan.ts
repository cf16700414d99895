import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { workshopsApi } from '../api/workshops';
import { computeSchedule } from '../../shared/schedule';
import { cautionsFor } from '../../shared/cautions';
import type { UpdateWorkshopBody, Workshop } from '../../shared/schemas/workshop';
import type { ActivityType, AgendaItem, AgendaItemInput } from '../../shared/schemas/agenda-item';

/** The workshop being planned: its brief and agenda, with the schedule recomputed as it changes. */
export const usePlanStore = defineStore('plan', () => {
  const workshop = ref<Workshop | null>(null);
  const agenda = ref<AgendaItem[]>([]);

  const canEdit = computed(() => workshop.value?.myRole === 'owner' || workshop.value?.myRole === 'cofacilitator');
  const isOwner = computed(() => workshop.value?.myRole === 'owner');
  /** Item times, load and rule warnings: the same shared function the server uses. */
  const schedule = computed(() =>
    workshop.value ? computeSchedule(agenda.value, workshop.value.window, workshop.value.rules) : null,
  );
  const cautions = computed(() =>
    workshop.value
      ? cautionsFor(agenda.value, {
          headcount: workshop.value.headcount,
          hasPhotos: false,
          roomCapacity: workshop.value.roomCapacity,
        })
      : [],
  );

  /** Loads a workshop with its agenda. */
  async function load(id: string): Promise<void> {
    const w = await workshopsApi.get(id);
    workshop.value = w;
    agenda.value = w.agenda;
  }

  /** Saves part of the brief. */
  async function saveBrief(body: UpdateWorkshopBody): Promise<void> {
    const w = await workshopsApi.update(workshop.value!.id, body);
    workshop.value = w;
    agenda.value = w.agenda;
  }

  /** Adds an activity from the library at a position (default: the end). */
  async function addItem(type: ActivityType, position?: number, title?: string): Promise<AgendaItem> {
    const item = await workshopsApi.addItem(workshop.value!.id, type, position, title);
    const at = position ?? agenda.value.length;
    agenda.value = [...agenda.value.slice(0, at), item, ...agenda.value.slice(at)];
    return item;
  }

  /** Saves an edited item. */
  async function updateItem(id: string, input: AgendaItemInput): Promise<void> {
    const saved = await workshopsApi.updateItem(workshop.value!.id, id, input);
    agenda.value = agenda.value.map((i) => (i.id === id ? saved : i));
  }

  /** Copies an item right after itself. */
  async function duplicateItem(id: string): Promise<void> {
    const copy = await workshopsApi.duplicateItem(workshop.value!.id, id);
    const at = agenda.value.findIndex((i) => i.id === id) + 1;
    agenda.value = [...agenda.value.slice(0, at), copy, ...agenda.value.slice(at)];
  }

  /** Removes an item. */
  async function removeItem(id: string): Promise<void> {
    await workshopsApi.removeItem(workshop.value!.id, id);
    agenda.value = agenda.value.filter((i) => i.id !== id);
  }

  /** Stores a new order (already shown; rolled back if the server refuses). */
  async function reorder(next: AgendaItem[]): Promise<void> {
    const before = agenda.value;
    agenda.value = next;
    try {
      agenda.value = await workshopsApi.reorder(workshop.value!.id, next.map((i) => i.id));
    } catch (err) {
      agenda.value = before;
      throw err;
    }
  }

  return { workshop, agenda, canEdit, isOwner, schedule, cautions, load, saveBrief, addItem, updateItem, duplicateItem, removeItem, reorder };
});
