// The bytes of files read at intake, kept until their set is dispatched so the payload carries
// exactly the bytes that were hashed and the file is not read from disk a second time. Bounded by
// a byte budget (oldest entries go first); a file not in the cache is read from disk as before.

/** Default byte budget of the intake content cache: 8 MiB (about 650 sets of the bench size). */
export const CONTENT_CACHE_BYTES = 8 * 1024 * 1024;

export class ContentCache {
  private readonly entries = new Map<number, Uint8Array>();
  private bytes = 0;

  constructor(private readonly maxBytes: number = CONTENT_CACHE_BYTES) {}

  /** Keeps the bytes of file `fileId` (skipped when one file would take more than a quarter of the budget). */
  put(fileId: number, content: Uint8Array): void {
    if (content.byteLength > this.maxBytes / 4) return;
    this.delete(fileId);
    this.entries.set(fileId, content);
    this.bytes += content.byteLength;
    for (const [id, old] of this.entries) {
      if (this.bytes <= this.maxBytes) break;
      this.entries.delete(id);
      this.bytes -= old.byteLength;
    }
  }

  /** Returns and forgets the bytes of `fileId`, if still cached. */
  take(fileId: number): Uint8Array | undefined {
    const content = this.entries.get(fileId);
    if (content !== undefined) this.delete(fileId);
    return content;
  }

  delete(fileId: number): void {
    const content = this.entries.get(fileId);
    if (content === undefined) return;
    this.entries.delete(fileId);
    this.bytes -= content.byteLength;
  }

  /** Bytes held now. */
  get sizeBytes(): number {
    return this.bytes;
  }
}
