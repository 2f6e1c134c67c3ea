import path from 'node:path';
import { env } from '$env/dynamic/private';

/** Where photos are stored: UPLOAD_DIR, or ./data/uploads beside the default database. */
export function getUploadDir(): string {
	return path.resolve(env.UPLOAD_DIR || './data/uploads');
}
