import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
} from "@aws-sdk/client-s3";
import { createReadStream } from "node:fs";
import { stat } from "node:fs/promises";
import type { Readable } from "node:stream";
import { StorageNotFound, type PhotoStorage } from "./contract";

export interface S3Options {
  bucket: string;
  endpoint?: string;
  region: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle?: boolean;
}

/** Photos in S3-compatible object storage, through the real AWS SDK. */
export class S3Storage implements PhotoStorage {
  readonly kind = "s3" as const;
  readonly client: S3Client;
  constructor(private opts: S3Options) {
    this.client = new S3Client({
      endpoint: opts.endpoint,
      region: opts.region,
      forcePathStyle: opts.forcePathStyle,
      credentials:
        opts.accessKeyId && opts.secretAccessKey
          ? { accessKeyId: opts.accessKeyId, secretAccessKey: opts.secretAccessKey }
          : undefined,
      // Checksums only when the API requires them: with the default ("when supported")
      // several S3-compatible servers store the aws-chunked framing inside the object
      // (seen with s3rver 3.7.1) — silently corrupt photos.
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
    });
  }

  async put(key: string, body: Buffer, contentType: string) {
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.opts.bucket,
        Key: key,
        Body: body,
        ContentType: contentType,
        ContentLength: body.length,
      }),
    );
  }

  /** Streamed from disk with its length known, so the SDK sends it as it reads it. */
  async putFile(key: string, path: string, contentType: string) {
    const { size } = await stat(path);
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.opts.bucket,
        Key: key,
        Body: createReadStream(path),
        ContentType: contentType,
        ContentLength: size,
      }),
    );
  }

  async check() {
    await this.client.send(new HeadBucketCommand({ Bucket: this.opts.bucket }));
  }

  async get(key: string): Promise<Readable> {
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.opts.bucket, Key: key }));
      return r.Body as Readable;
    } catch (e) {
      const name = (e as { name?: string }).name;
      if (name === "NoSuchKey" || name === "NotFound") throw new StorageNotFound(key);
      throw e;
    }
  }

  decodeSource(key: string): Promise<Buffer> {
    return this.getBytes(key);
  }

  async getBytes(key: string): Promise<Buffer> {
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.opts.bucket, Key: key }));
      const bytes = await r.Body!.transformToByteArray();
      return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    } catch (e) {
      const name = (e as { name?: string }).name;
      if (name === "NoSuchKey" || name === "NotFound") throw new StorageNotFound(key);
      throw e;
    }
  }

  async delete(key: string) {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.opts.bucket, Key: key }));
  }

  async listKeys(prefix = "") {
    const keys: string[] = [];
    let token: string | undefined;
    do {
      const r = await this.client.send(
        new ListObjectsV2Command({ Bucket: this.opts.bucket, Prefix: prefix || undefined, ContinuationToken: token }),
      );
      for (const o of r.Contents ?? []) if (o.Key) keys.push(o.Key);
      token = r.IsTruncated ? r.NextContinuationToken : undefined;
    } while (token);
    return keys.sort();
  }
}
