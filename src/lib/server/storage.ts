import {
	DeleteObjectCommand,
	GetObjectCommand,
	HeadBucketCommand,
	NoSuchKey,
	PutObjectCommand,
	S3Client,
	S3ServiceException
} from '@aws-sdk/client-s3';

/** Where objects live: any service that speaks the S3 API (the shop's own, a cloud bucket, or the local fake). */
export interface StorageConfig {
	/** e.g. http://127.0.0.1:9000; unset means the provider's default endpoint for `region`. */
	endpoint?: string;
	region: string;
	bucket: string;
	/** Both or neither: when unset the SDK's default credential chain applies (environment, instance role…). */
	accessKeyId?: string;
	secretAccessKey?: string;
	/** Path-style URLs (`endpoint/bucket/key`) — what self-hosted S3 services and the fake expect. */
	pathStyle: boolean;
}

/** The few object operations the app needs. Bodies are whole byte arrays: images are capped well below memory. */
export interface ObjectStore {
	readonly bucket: string;
	put(key: string, body: Uint8Array, contentType: string): Promise<void>;
	/** The object's bytes, or undefined when no object has this key. */
	get(key: string): Promise<Uint8Array | undefined>;
	delete(key: string): Promise<void>;
	/** Throws when the bucket cannot be reached with these settings. */
	check(): Promise<void>;
	close(): void;
}

export function createObjectStore(config: StorageConfig): ObjectStore {
	const client = new S3Client({
		endpoint: config.endpoint,
		region: config.region,
		forcePathStyle: config.pathStyle,
		credentials:
			config.accessKeyId && config.secretAccessKey
				? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey }
				: undefined,
		// With the SDK's default ('WHEN_SUPPORTED') a body is sent with aws-chunked framing and a trailing checksum;
		// services that do not understand it (the fake, some self-hosted ones) store the framing inside the object.
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED',
		maxAttempts: 3
	});
	const Bucket = config.bucket;
	return {
		bucket: Bucket,
		async put(key, body, contentType) {
			await client.send(
				new PutObjectCommand({ Bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.byteLength })
			);
		},
		async get(key) {
			try {
				const res = await client.send(new GetObjectCommand({ Bucket, Key: key }));
				return res.Body ? await res.Body.transformToByteArray() : new Uint8Array();
			} catch (e) {
				if (e instanceof NoSuchKey || (e instanceof S3ServiceException && e.$metadata.httpStatusCode === 404))
					return undefined;
				throw e;
			}
		},
		async delete(key) {
			await client.send(new DeleteObjectCommand({ Bucket, Key: key }));
		},
		async check() {
			await client.send(new HeadBucketCommand({ Bucket }));
		},
		close: () => client.destroy()
	};
}

let current: ObjectStore | undefined;

/** Points the app's object storage at a store: the configured service in production, the fake in demo and tests. */
export function useObjectStore(store: ObjectStore): void {
	current?.close();
	current = store;
}

export function objectStore(): ObjectStore {
	if (!current)
		throw new Error('Object storage is not configured: set S3_BUCKET (and S3_ENDPOINT for a self-hosted service).');
	return current;
}

/** Forgets the current store (runtime stop, tests). */
export function closeObjectStore(): void {
	current?.close();
	current = undefined;
}
