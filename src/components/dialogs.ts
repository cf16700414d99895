import { Dialog, type QDialogOptions } from 'quasar';

type DialogButton = QDialogOptions['ok'];

// Sentence case on every button (docs/glossary.md): the plugin's buttons are upper case unless told otherwise.
function sentenceCase(button: DialogButton, label: string, flat: boolean): DialogButton {
  if (button === undefined || button === false) return button;
  if (button === true) return { label, flat, noCaps: true };
  if (typeof button === 'string') return { label: button, flat, noCaps: true };
  return { noCaps: true, ...button };
}

/**
 * Opens one of Quasar's plugin dialogs with its title as the dialog's accessible name, so a screen
 * reader announces what is asked (the plugin itself gives the dialog no name), and its buttons in
 * sentence case like every other button ("Cancel", never "CANCEL").
 * @example openDialog({ title: 'Delete this item?', cancel: true }).onOk(remove)
 */
export function openDialog(options: QDialogOptions & { title: string }): ReturnType<typeof Dialog.create> {
  // Attributes the plugin does not declare fall through to its QDialog and onto the role="dialog" element.
  return Dialog.create({
    ...options,
    ok: sentenceCase(options.ok ?? true, 'OK', false),
    cancel: sentenceCase(options.cancel, 'Cancel', true),
    'aria-label': options.title,
  } as QDialogOptions);
}
