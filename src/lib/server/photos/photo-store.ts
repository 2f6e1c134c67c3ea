/**
 * Where photo bytes live: one PhotoStore, chosen once from the environment. PHOTO_STORE=folder
 * (the default) keeps them under UPLOAD_DIR; PHOTO_STORE=s3 keeps them in an S3-compatible bucket,
 * so several app processes on several machines see the same photos. Keys are the relative names
 * stored in the photos table (`photos/ab/ab12….jpg`), the same on both, so a folder copied into
 * a bucket (`aws s3 sync data/uploads s3://bucket`) is a working photo store.
 */
import path from 'node:path';
import { folderPhotoStore } from './folder-store';
import { s3PhotoStore, type S3PhotoStoreConfig } from './s3-store';

export interface PhotoStore {
	/** Where the photos are, for log lines: "folder /srv/uploads", "S3 bucket photos at …". */
	readonly where: string;
	/** Stores `bytes` under a new `key` (the folder store refuses a key already there). */
	put(key: string, bytes: Uint8Array): Promise<void>;
	/** The bytes stored under `key`, or null when there is nothing there. */
	get(key: string): Promise<Buffer | null>;
	/** Removes `key`; a key that is already gone is fine. */
	delete(key: string): Promise<void>;
	/** Why photos cannot be stored right now (a sentence for the log), or null when they can. */
	problem(): Promise<string | null>;
}

type Env = Record<string, string | undefined>;

/** The upload folder of the folder store: UPLOAD_DIR, or ./data/uploads beside the default database. */
export function uploadDirOf(env: Env): string {
	return path.resolve(env.UPLOAD_DIR || './data/uploads');
}

/** The S3 settings of PHOTO_STORE=s3, with a sentence naming every missing variable. */
export function s3ConfigOf(env: Env): S3PhotoStoreConfig {
	if (!env.S3_BUCKET) {
		throw new Error('PHOTO_STORE=s3 needs S3_BUCKET (and S3_ENDPOINT for a store other than AWS).');
	}
	if (!env.S3_ACCESS_KEY_ID !== !env.S3_SECRET_ACCESS_KEY) {
		throw new Error('Set both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or neither.');
	}
	const endpoint = env.S3_ENDPOINT || null;
	return {
		bucket: env.S3_BUCKET,
		endpoint,
		region: env.S3_REGION || 'us-east-1',
		// Stores other than AWS (MinIO, s3rver, Ceph) mostly want bucket-in-path addresses.
		forcePathStyle: env.S3_FORCE_PATH_STYLE ? env.S3_FORCE_PATH_STYLE !== 'false' : !!endpoint,
		credentials: env.S3_ACCESS_KEY_ID
			? { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? '' }
			: null
	};
}

/** The photo store the environment asks for (PHOTO_STORE: folder, the default, or s3). */
export function photoStoreFromEnv(env: Env): PhotoStore {
	const kind = env.PHOTO_STORE || 'folder';
	if (kind === 'folder') return folderPhotoStore(uploadDirOf(env));
	if (kind === 's3') return s3PhotoStore(s3ConfigOf(env));
	throw new Error(`PHOTO_STORE=${kind} is not known: use folder (the default) or s3.`);
}
