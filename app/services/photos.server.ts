/**
 * The photo pipeline: multipart upload → uploads/tmp/<uuid>.part → sharp (pixel cap, only the JPEG/PNG/WebP decoders,
 * orientation applied, every piece of metadata dropped) → WebP display size and thumbnail written as .part, fsynced,
 * renamed into uploads/photos/ → one IMMEDIATE transaction checks the quotas and inserts the rows. Files are served
 * only through routes/photos.$file.ts, by id, to those allowed to see them.
 *
 * Crash safety (QUALITY D6): a reader can only ever find complete files under photos/<uuid>.webp (rename is atomic);
 * a row is inserted only after its files are durable; whatever a crash leaves behind (tmp/*, *.part, files without a
 * row) is removed by sweepPhotos once it is old enough that no upload can still be working on it.
 *
 * The one way in for the rest of the app; each job has its own module in ./photos/: limits (sizes, counts, quotas),
 * storage (directories, temp write, fsync, rename), process (sharp), receive (the multipart upload), access (who may
 * see a file), sweeper, errors, and faults (the test-only CRASH_AT and UPLOAD_FAULT hooks, never set in production).
 */
export { MAX_BODY_BYTES, PHOTO_LICENCE, PHOTO_LICENCE_URL, PHOTO_LIMITS } from "./photos/limits.server";
export { PHOTOS_DIR, TMP_DIR, UPLOADS_DIR } from "./photos/storage.server";
export { ALLOWED_LOADERS } from "./photos/process.server";
export { PhotoError, photoErrorResponse } from "./photos/errors.server";
export { receivePhotos, type StoredPhoto } from "./photos/receive.server";
export { photoForViewer } from "./photos/access.server";
export { deleteRemovedPhotoFiles, startPhotoSweeper, stopPhotoSweeper, sweepPhotos, type SweepResult } from "./photos/sweeper.server";
// The public addresses of a photo's display size and thumbnail: one definition, shared with the client.
export { photoUrls } from "~/domain/photo-urls";
