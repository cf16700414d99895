/**
 * Resolves in a task of its own: lets the browser paint and answer input between the steps of a phone's start,
 * each of which would otherwise add to one long task on a slow phone (Lighthouse counts a task's time past 50 ms,
 * under a 4× slower CPU, as blocking).
 */
export const nextTask = (): Promise<void> => new Promise<void>((resolve) => setTimeout(resolve, 0));
