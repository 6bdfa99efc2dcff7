// Re-exports of the storage modules; no logic here.
export * from "@/lib/storage/object-store";
export * from "@/lib/storage/keys";
export * from "@/lib/storage/create-object-store";
export { LocalDiskStore, type LocalDiskStoreOptions } from "@/lib/storage/local-disk";
export { S3Store, S3_MIN_PART_SIZE, type S3StoreOptions } from "@/lib/storage/s3";
