import type { Locale } from '../../../shared/locales';

/**
 * The e-mail that brings a participant the report, in the language their phone showed (one catalog per
 * language, each with the same keys and the same `{placeholders}`: tests/shared/catalogs.test.ts).
 */
export const PARTICIPANT_MAIL: Readonly<Record<Locale, Readonly<Record<string, string>>>> = {
  en: {
    subject: 'Report of the workshop {title}',
    quoted: '“{title}” ({date})',
    greeting: 'Hello,',
    attached: 'You asked for the report of the workshop {title}. It is attached as a PDF, without the names of participants.',
    adds: '{name} adds:',
    why: 'You get this e-mail because you left this address on your phone at the workshop.',
    keep: 'Names, photos and e-mail addresses are kept until the facilitator deletes them.',
    deleteSoon: 'Names, photos and e-mail addresses are deleted after the workshop.',
    deleteAfter: 'Names, photos and e-mail addresses are deleted {days} days after the workshop.',
  },
  de: {
    subject: 'Bericht zum Workshop {title}',
    quoted: '„{title}“ ({date})',
    greeting: 'Hallo,',
    attached: 'Sie wollten den Bericht zum Workshop {title} haben. Er hängt als PDF an, ohne die Namen der Teilnehmenden.',
    adds: '{name} schreibt dazu:',
    why: 'Sie bekommen diese E-Mail, weil Sie diese Adresse beim Workshop auf Ihrem Handy hinterlassen haben.',
    keep: 'Namen, Fotos und E-Mail-Adressen bleiben gespeichert, bis die Moderation sie löscht.',
    deleteSoon: 'Namen, Fotos und E-Mail-Adressen werden nach dem Workshop gelöscht.',
    deleteAfter: 'Namen, Fotos und E-Mail-Adressen werden {days} Tage nach dem Workshop gelöscht.',
  },
  es: {
    subject: 'Informe del taller {title}',
    quoted: '«{title}» ({date})',
    greeting: 'Hola:',
    attached: 'Pediste el informe del taller {title}. Va adjunto en PDF, sin los nombres de las personas participantes.',
    adds: '{name} añade:',
    why: 'Recibes este correo porque dejaste esta dirección en tu móvil durante el taller.',
    keep: 'Los nombres, las fotos y las direcciones de correo se guardan hasta que la persona facilitadora los borre.',
    deleteSoon: 'Los nombres, las fotos y las direcciones de correo se borran después del taller.',
    deleteAfter: 'Los nombres, las fotos y las direcciones de correo se borran {days} días después del taller.',
  },
};

/** Fills a catalog text's `{placeholders}`. */
function fill(text: string, values: Record<string, string>): string {
  return text.replace(/\{(\w+)\}/g, (whole, key: string) => values[key] ?? whole);
}

/**
 * The participant's e-mail with the report, in their language: the workshop's title with its date as
 * the language writes dates (`Intl`), the facilitator's note as written, and a promise about personal
 * data that agrees with the workshop's retention setting.
 */
export function participantMail(
  locale: Locale,
  workshop: { title: string; date: string; retentionDays: number | null },
  note: { from: string; text: string } | null,
): { subject: string; text: string } {
  const words = PARTICIPANT_MAIL[locale] ?? PARTICIPANT_MAIL.en;
  const day = /^\d{4}-\d{2}-\d{2}$/.test(workshop.date)
    ? new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${workshop.date}T00:00:00Z`))
    : workshop.date;
  // Each language quotes a title its own way: “…” in English, „…“ in German, «…» in Spanish.
  const title = fill(words.quoted!, { title: workshop.title, date: day });
  const days = workshop.retentionDays;
  const promise = days === null ? words.keep! : days === 0 ? words.deleteSoon! : fill(words.deleteAfter!, { days: new Intl.NumberFormat(locale).format(days) });
  const lines = [words.greeting!, '', fill(words.attached!, { title }), ''];
  if (note) lines.push(fill(words.adds!, { name: note.from }), '', note.text, '');
  lines.push(`${words.why!} ${promise}`, '');
  return { subject: fill(words.subject!, { title }), text: lines.join('\n') };
}
