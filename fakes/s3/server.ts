// fakes/ is outside the tsconfig include, so the types of s3rver come along with this file.
// eslint-disable-next-line @typescript-eslint/triple-slash-reference
/// <reference path="./s3rver.d.ts" />
/**
 * Fake S3 for development and tests: s3rver keeps the objects as files in a folder and answers
 * the S3 calls Castellan's photo store makes (put, get, delete, head bucket, list).
 *
 *   npm run fake:s3        S3 on http://127.0.0.1:4569, bucket castellan-photos, in ./data/fake-s3
 *   FAKE_S3_PORT / FAKE_S3_DIR / FAKE_S3_BUCKET override them.
 *
 * Self-contained on purpose (nothing imported from src/): it stands in for a hosted service.
 */
import { mkdir } from 'node:fs/promises';
import path from 'node:path';
import S3rver from 's3rver';
import { isEntryPoint } from '../entry-point';

/** s3rver checks request signatures against this one account. */
export const FAKE_S3_KEY = 'S3RVER';

export interface FakeS3Options {
	/** 0 picks a free port; the one in use is on the returned object. */
	port?: number;
	host?: string;
	/** Where the objects are kept (created when missing). */
	directory: string;
	bucket?: string;
}

export interface FakeS3 {
	port: number;
	endpoint: string;
	bucket: string;
	/** The variables that point Castellan's photo store at this fake. */
	env: Record<string, string>;
	close(): Promise<void>;
}

export async function startFakeS3({
	port = 4569,
	host = '127.0.0.1',
	directory,
	bucket = 'castellan-photos'
}: FakeS3Options): Promise<FakeS3> {
	await mkdir(directory, { recursive: true });
	const server = new S3rver({
		port,
		address: host,
		silent: true,
		directory,
		configureBuckets: [{ name: bucket }]
	});
	const address = await server.run();
	const endpoint = `http://${host}:${address.port}`;
	return {
		port: address.port,
		endpoint,
		bucket,
		env: {
			PHOTO_STORE: 's3',
			S3_ENDPOINT: endpoint,
			S3_BUCKET: bucket,
			S3_REGION: 'us-east-1',
			S3_ACCESS_KEY_ID: FAKE_S3_KEY,
			S3_SECRET_ACCESS_KEY: FAKE_S3_KEY
		},
		close: () => server.close()
	};
}

/** The fake's settings from FAKE_S3_PORT / FAKE_S3_DIR / FAKE_S3_BUCKET, for fake:s3 and demo. */
export function fakeS3OptionsFromEnv(
	env: Record<string, string | undefined> = process.env
): FakeS3Options {
	const port = Number(env.FAKE_S3_PORT ?? 4569);
	if (!Number.isInteger(port) || port < 0 || port > 65535) {
		throw new Error(`FAKE_S3_PORT=${env.FAKE_S3_PORT} is not a port number.`);
	}
	return {
		port,
		directory: path.resolve(env.FAKE_S3_DIR || './data/fake-s3'),
		bucket: env.FAKE_S3_BUCKET || 'castellan-photos'
	};
}

if (isEntryPoint(import.meta.url)) {
	const options = fakeS3OptionsFromEnv();
	const s3 = await startFakeS3(options);
	console.log(`Fake S3: ${s3.endpoint}, bucket ${s3.bucket}, objects in ${options.directory}`);
	console.log('Point Castellan at it with:');
	for (const [k, v] of Object.entries(s3.env)) console.log(`  ${k}=${v}`);
	const stop = () => {
		s3.close().then(
			() => process.exit(0),
			() => process.exit(1)
		);
	};
	process.once('SIGINT', stop);
	process.once('SIGTERM', stop);
}
