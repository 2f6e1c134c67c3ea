import { env } from '$env/dynamic/private';
import { photoStoreFromEnv, type PhotoStore } from './photo-store';

export type { PhotoStore } from './photo-store';

let instance: PhotoStore | undefined;

/**
 * The app's one photo store, chosen on first use from PHOTO_STORE: the UPLOAD_DIR folder (the
 * default) or an S3-compatible bucket (PHOTO_STORE=s3, S3_* variables).
 *
 * Photos are always served through Castellan's own routes (the bytes fetched from the store by
 * the server after the access check), never by redirecting to a pre-signed bucket address: the
 * access rule stays in one place, another customer's photo stays a plain 404 rather than a link
 * that works for anyone who has it for its lifetime, and the bucket need not be reachable from
 * the browsers at all.
 */
export function getPhotoStore(): PhotoStore {
	instance ??= photoStoreFromEnv(env);
	return instance;
}
