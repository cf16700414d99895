import { Dialog, type QDialogOptions } from 'quasar';

/**
 * Opens one of Quasar's plugin dialogs with its title as the dialog's accessible name, so a screen
 * reader announces what is asked (the plugin itself gives the dialog no name).
 * @example openDialog({ title: 'Delete this item?', cancel: true }).onOk(remove)
 */
export function openDialog(options: QDialogOptions & { title: string }): ReturnType<typeof Dialog.create> {
  // Attributes the plugin does not declare fall through to its QDialog and onto the role="dialog" element.
  return Dialog.create({ ...options, 'aria-label': options.title } as QDialogOptions);
}
