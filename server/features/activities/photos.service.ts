import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import sharp from 'sharp';
import { UniqueConstraintError } from 'sequelize';
import type { AppContext } from '../../context';
import type { PhotoRow } from '../../db/models';
import { AppError, because, errors } from '../../common/errors';
import { type LiveService } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import type { SubmissionsService } from '../live/submissions.service';
import { ACTIVITY_LIBRARY } from '../../../shared/activities';
import { ACTIVITY_LIMITS, type PhotoUploadAnswer, type PhotoUploadFields } from '../../../shared/schemas/activities';
import type { ActivityType } from '../../../shared/schemas/agenda-item';

/** The picture formats Cairn takes, told apart by their first bytes. */
export type ImageType = 'png' | 'jpeg' | 'webp';

/**
 * The format of a file by its signature (magic bytes), never by its name or declared type:
 * PNG's 8-byte signature (PNG specification §5.2), JPEG's start-of-image marker FF D8 followed by a
 * marker's FF (ITU-T T.81), WebP's RIFF container with the WEBP form type (RFC 9649 §2).
 * @example sniffImageType(Buffer.from([0xff, 0xd8, 0xff, 0xe0])) // 'jpeg'
 */
export function sniffImageType(bytes: Uint8Array): ImageType | null {
  const at = (i: number, ...values: number[]) => values.every((v, k) => bytes[i + k] === v);
  if (bytes.length >= 8 && at(0, 0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a)) return 'png';
  if (bytes.length >= 3 && at(0, 0xff, 0xd8, 0xff)) return 'jpeg';
  if (bytes.length >= 12 && at(0, 0x52, 0x49, 0x46, 0x46) && at(8, 0x57, 0x45, 0x42, 0x50)) return 'webp';
  return null;
}

/**
 * Whether a photo may be shown as it is: it shows nobody, or its uploader says everyone in it agreed
 * and has photo consent on themselves (withdrawing consent later blurs it again).
 */
export function photoCleared(photo: Pick<PhotoRow, 'showsPeople' | 'peopleConsent'>, uploaderConsent: boolean): boolean {
  return !photo.showsPeople || (photo.peopleConsent && uploaderConsent);
}

/** Which copy of a photo a screen asks for. */
export type PhotoSize = 'thumb' | 'full';

/** Who asks for a photo: an account of the workshop, a projector's display token, or a participant. */
export type PhotoReader =
  | { kind: 'account'; workshopId: string }
  | { kind: 'display'; sessionId: string }
  | { kind: 'participant'; sessionId: string; participantId: string };

/** The longest side of the stored photo and of its thumbnail, in pixels. */
const FULL_SIDE = 1600;
const THUMB_SIDE = 480;
/** The blurred copy is made from a picture this small, so no face can be read back out of it. */
const BLUR_SOURCE_SIDE = 24;

/** How long a retry that lost the race waits for the first copy's note: up to 40 × 50 ms. */
const RACE_WAIT_TRIES = 40;
const RACE_WAIT_MS = 50;

const unsupported = () =>
  new AppError(415, 'unsupported_media', 'That file is not a photo Cairn can take: send a PNG, JPEG or WebP picture');

/**
 * Photos taken on the phones (sketches, storyboard frames): checks the file by its signature,
 * re-encodes it with sharp under a pixel limit (which also drops location and camera metadata),
 * keeps a full copy, a thumbnail and a blurred thumbnail under random names in the upload folder,
 * and serves them only to screens of the photo's session, blurred where consent is not on record.
 */
export class PhotosService {
  /** Uploads being stored now, by participant and clientId. */
  private inFlight = new Map<string, Promise<PhotoUploadAnswer>>();

  constructor(
    private ctx: AppContext,
    private live: LiveService,
    private presence: PresenceService,
    private submissions: SubmissionsService,
  ) {}

  /** Where the files of a photo live (outside any folder the server serves). */
  private filesOf(storageKey: string): Record<'full' | 'thumb' | 'blur', string> {
    const dir = this.ctx.config.uploadDir;
    return {
      full: path.join(dir, `${storageKey}.jpg`),
      thumb: path.join(dir, `${storageKey}.thumb.jpg`),
      blur: path.join(dir, `${storageKey}.blur.jpg`),
    };
  }

  /**
   * Stores a participant's photo and the note it goes with (a sketch, or a storyboard frame), exactly
   * once per `clientId`. Refused photos leave nothing behind: files are written only once every check
   * passed, and removed again when the note is refused.
   */
  async upload(participantId: string, sessionId: string, fields: PhotoUploadFields, file: Buffer | undefined): Promise<PhotoUploadAnswer> {
    const key = `${participantId}\n${fields.clientId}`;
    // A retry sent while the first copy is still being stored waits for it and gets what it stored;
    // if the first failed, the next one tries on its own.
    for (let running = this.inFlight.get(key); running; running = this.inFlight.get(key)) {
      const first = await running.catch(() => null);
      if (first) return { ...first, duplicate: true };
    }
    const attempt = this.store(participantId, sessionId, fields, file);
    this.inFlight.set(key, attempt);
    try {
      return await attempt;
    } finally {
      if (this.inFlight.get(key) === attempt) this.inFlight.delete(key);
    }
  }

  /** Stores one upload (see `upload`, which keeps copies of one upload from racing each other). */
  private async store(participantId: string, sessionId: string, fields: PhotoUploadFields, file: Buffer | undefined): Promise<PhotoUploadAnswer> {
    const { Submission, Photo, AgendaItem, LiveSession } = this.ctx.db.models;
    const first = await Submission.findOne({ where: { participantId, clientId: fields.clientId }, attributes: ['id', 'fields'] });
    if (first) return { submissionId: first.id, photoId: first.fields?.photoId ?? '', duplicate: true };

    if (!file || file.length === 0) throw errors.badRequest('Choose a photo first', because('photo_none'));
    // Cheap checks first, so a photo that cannot be taken now is not decoded for nothing.
    const [participant, session, item] = await Promise.all([
      this.presence.participantOf(participantId, sessionId),
      LiveSession.findByPk(sessionId),
      AgendaItem.findByPk(fields.itemId),
    ]);
    const refused = await this.live.gate(sessionId, Boolean(participant));
    if (refused) throw refused;
    if (!session) throw errors.notFound('live_session');
    if (!item || item.workshopId !== session.workshopId) throw errors.notFound('item');
    const photoKind = ACTIVITY_LIBRARY[item.type as ActivityType].photos;
    if (!photoKind) throw errors.badRequest('This activity does not take photos', because('photo_not_taken'));
    const tooMany = (mine: number) =>
      errors.badRequest(`You have added ${mine} photos to this activity, the most one person can; ask the facilitator to hide some`, because('photo_limit', { count: mine }));
    const mine = await Photo.count({ where: { participantId, itemId: item.id } });
    if (mine >= ACTIVITY_LIMITS.photosPerPersonPerItem) throw tooMany(mine);

    const type = sniffImageType(file);
    if (!type) throw unsupported();
    const images = await this.process(file, type);

    const storageKey = crypto.randomBytes(16).toString('hex');
    const files = this.filesOf(storageKey);
    await fs.mkdir(this.ctx.config.uploadDir, { recursive: true, mode: 0o700 });
    const written: string[] = [];
    const removeFiles = () => Promise.all(written.map((f) => fs.rm(f, { force: true })));
    let photo: PhotoRow | null = null;
    try {
      for (const [key, data] of Object.entries(images.buffers) as ['full' | 'thumb' | 'blur', Buffer][]) {
        await fs.writeFile(files[key], data, { flag: 'wx', mode: 0o600 });
        written.push(files[key]);
      }
      photo = await this.ctx.db.writeTx(async (transaction) => {
        // Counted again inside the writer, so uploads that passed the first count together cannot pass the limit.
        const stored = await Photo.count({ where: { participantId, itemId: item.id }, transaction });
        if (stored >= ACTIVITY_LIMITS.photosPerPersonPerItem) throw tooMany(stored);
        return Photo.create(
          {
            id: crypto.randomUUID(),
            sessionId,
            itemId: item.id,
            participantId,
            clientId: fields.clientId,
            storageKey,
            width: images.width,
            height: images.height,
            bytes: images.buffers.full.length,
            showsPeople: fields.showsPeople,
            // Consent for others in the picture only means something when it shows people.
            peopleConsent: fields.showsPeople && fields.peopleConsent,
            createdAt: new Date(),
          },
          { transaction },
        );
      });
      const made = await this.submissions.create(participantId, sessionId, {
        clientId: fields.clientId,
        itemId: item.id,
        kind: photoKind,
        text: fields.caption,
        fields: { photoId: photo.id },
      });
      return { submissionId: made.id, photoId: photo.id, duplicate: false };
    } catch (err) {
      const madePhoto = photo as PhotoRow | null;
      if (madePhoto) await this.ctx.db.writeTx((transaction) => madePhoto.destroy({ transaction })).catch(() => undefined);
      await removeFiles();
      // A copy that raced this one past the first lookup (in another process): answer with what it stored,
      // once its note is there too.
      if (err instanceof UniqueConstraintError) {
        for (let i = 0; i < RACE_WAIT_TRIES; i++) {
          const again = await Submission.findOne({ where: { participantId, clientId: fields.clientId }, attributes: ['id', 'fields'] });
          if (again) return { submissionId: again.id, photoId: again.fields?.photoId ?? '', duplicate: true };
          await new Promise((resolve) => setTimeout(resolve, RACE_WAIT_MS));
        }
        throw errors.conflict('This photo is still being stored; try again in a moment', because('photo_storing'));
      }
      throw err;
    }
  }

  /**
   * One copy of a photo for a screen of its session. Hidden photos are not served to the room or the
   * phones (the facilitators still see them, to undo); a photo not cleared for showing is served
   * blurred to everyone but the person who took it.
   */
  async read(photoId: string, reader: PhotoReader, size: PhotoSize): Promise<{ data: Buffer; blurred: boolean }> {
    const { Photo, Submission, Participant, LiveSession } = this.ctx.db.models;
    const photo = await Photo.findByPk(photoId);
    const missing = () => errors.notFound('photo');
    if (!photo) throw missing();
    if (reader.kind === 'account') {
      const session = await LiveSession.findByPk(photo.sessionId, { attributes: ['id', 'workshopId'] });
      if (session?.workshopId !== reader.workshopId) throw missing();
    } else if (reader.sessionId !== photo.sessionId) throw missing();
    const own = reader.kind === 'participant' && reader.participantId === photo.participantId;
    if (reader.kind !== 'account' && !own) {
      const note = await Submission.findOne({ where: { participantId: photo.participantId, clientId: photo.clientId }, attributes: ['id', 'hidden', 'mergedIntoId'] });
      if (!note || note.hidden || note.mergedIntoId) throw missing();
    }
    const uploader = await Participant.findByPk(photo.participantId, { attributes: ['id', 'photoConsent'] });
    const blurred = !own && !photoCleared(photo, uploader?.photoConsent ?? false);
    const files = this.filesOf(photo.storageKey);
    const file = blurred ? files.blur : size === 'full' ? files.full : files.thumb;
    try {
      return { data: await fs.readFile(file), blurred };
    } catch {
      throw missing();
    }
  }

  /** Decodes and re-encodes a picture under the pixel limit: a full copy, a thumbnail and a blurred thumbnail. */
  private async process(file: Buffer, type: ImageType): Promise<{ width: number; height: number; buffers: Record<'full' | 'thumb' | 'blur', Buffer> }> {
    // sharp refuses an image whose header declares more pixels than the limit before it decodes anything.
    const open = () => sharp(file, { limitInputPixels: ACTIVITY_LIMITS.photoPixels, failOn: 'error', animated: false });
    try {
      const meta = await open().metadata();
      // The signature and what the decoder found must agree (a PNG signature on a JPEG body is not a photo).
      if (meta.format !== type) throw unsupported();
      if (!meta.width || !meta.height || meta.width * meta.height > ACTIVITY_LIMITS.photoPixels) throw tooManyPixels();
      const full = await open()
        .autoOrient()
        .flatten({ background: '#ffffff' })
        .resize({ width: FULL_SIDE, height: FULL_SIDE, fit: 'inside', withoutEnlargement: true })
        .jpeg({ quality: 82, mozjpeg: true })
        .toBuffer({ resolveWithObject: true });
      const thumb = await sharp(full.data).resize({ width: THUMB_SIDE, height: THUMB_SIDE, fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 78 }).toBuffer();
      const tiny = await sharp(full.data).resize({ width: BLUR_SOURCE_SIDE, height: BLUR_SOURCE_SIDE, fit: 'inside' }).toBuffer();
      const thumbMeta = await sharp(thumb).metadata();
      const blur = await sharp(tiny)
        .resize({ width: thumbMeta.width, height: thumbMeta.height, fit: 'fill', kernel: 'cubic' })
        .blur(6)
        .jpeg({ quality: 70 })
        .toBuffer();
      return { width: full.info.width, height: full.info.height, buffers: { full: full.data, thumb, blur } };
    } catch (err) {
      if (err instanceof AppError) throw err;
      const message = err instanceof Error ? err.message : '';
      if (/pixel limit/i.test(message)) throw tooManyPixels();
      throw new AppError(400, 'unsupported_media', 'That picture could not be read; take the photo again', undefined, { reason: 'photo_unreadable' });
    }
  }
}

function tooManyPixels(): AppError {
  return new AppError(413, 'payload_too_large', 'That picture has too many pixels to take; use your camera’s normal photo size', undefined, { reason: 'photo_too_many_pixels' });
}
