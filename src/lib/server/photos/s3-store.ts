// PHOTO_STORE=s3: photo bytes in an S3-compatible bucket (AWS S3, MinIO, Ceph, s3rver in tests).
import type { S3Client } from '@aws-sdk/client-s3';
import type { PhotoStore } from './photo-store';

export interface S3PhotoStoreConfig {
	bucket: string;
	/** null: AWS itself, found from the region. */
	endpoint: string | null;
	region: string;
	forcePathStyle: boolean;
	/** null: the SDK's own chain (instance role, AWS_* variables, ~/.aws). */
	credentials: { accessKeyId: string; secretAccessKey: string } | null;
}

function isNotFound(error: unknown): boolean {
	const e = error as { name?: string; $metadata?: { httpStatusCode?: number } };
	return e?.name === 'NoSuchKey' || e?.name === 'NotFound' || e?.$metadata?.httpStatusCode === 404;
}

/**
 * Photos in one bucket under their stored names. The SDK is loaded on first use, so processes
 * that keep photos in a folder never load it. Keys are 128-bit random names, so a put cannot
 * meet an existing object (S3's conditional write, If-None-Match, is left out: not every
 * S3-compatible store supports it).
 */
export function s3PhotoStore(config: S3PhotoStoreConfig): PhotoStore {
	let loaded: Promise<{ sdk: typeof import('@aws-sdk/client-s3'); client: S3Client }> | undefined;
	const load = () =>
		(loaded ??= import('@aws-sdk/client-s3').then((sdk) => ({
			sdk,
			client: new sdk.S3Client({
				region: config.region,
				endpoint: config.endpoint ?? undefined,
				forcePathStyle: config.forcePathStyle,
				credentials: config.credentials ?? undefined,
				// Checksums only where S3 demands them: several S3-compatible stores reject the
				// newer default checksum headers.
				requestChecksumCalculation: 'WHEN_REQUIRED',
				responseChecksumValidation: 'WHEN_REQUIRED'
			})
		})));
	const Bucket = config.bucket;
	const where = `S3 bucket ${Bucket}${config.endpoint ? ` at ${config.endpoint}` : ` (${config.region})`}`;
	return {
		where,
		async put(key, bytes) {
			const { sdk, client } = await load();
			await client.send(
				new sdk.PutObjectCommand({ Bucket, Key: key, Body: bytes, ContentType: 'image/jpeg' })
			);
		},
		async get(key) {
			const { sdk, client } = await load();
			try {
				const res = await client.send(new sdk.GetObjectCommand({ Bucket, Key: key }));
				if (!res.Body) return null;
				return Buffer.from(await res.Body.transformToByteArray());
			} catch (error) {
				if (isNotFound(error)) return null;
				throw error;
			}
		},
		async delete(key) {
			const { sdk, client } = await load();
			await client.send(new sdk.DeleteObjectCommand({ Bucket, Key: key }));
		},
		// HeadBucket: the bucket exists and the keys reach it (on AWS it needs s3:ListBucket). Cheap
		// enough to ask before every upload, as the folder store writes a probe file.
		async problem() {
			const { sdk, client } = await load();
			try {
				await client.send(new sdk.HeadBucketCommand({ Bucket }));
				return null;
			} catch (error) {
				const e = error as { name?: string; code?: string; message?: string };
				const cause = e.name && e.name !== 'Error' ? e.name : (e.code ?? e.message ?? 'error');
				return `The photo store (${where}) cannot be reached (${cause}). Check S3_ENDPOINT, S3_BUCKET and the S3 keys.`;
			}
		}
	};
}
