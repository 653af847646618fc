// Results that depend on the artwork alone, kept per thread for the sheets of its press run: held weakly by
// the artwork's pixel buffer (they go with it) and keyed by the view into that buffer and whatever else they
// depend on. Never shared between threads.
import type { RgbaImage } from "../types";

export class ArtworkCache<T> {
  private readonly byBuffer = new WeakMap<ArrayBufferLike, Map<string, T>>();

  /** At most `maxEntries` results per artwork buffer; the oldest goes first. */
  constructor(private readonly maxEntries = Infinity) {}

  peek(artwork: RgbaImage, key: string): T | undefined {
    return this.byBuffer.get(artwork.data.buffer)?.get(fullKey(artwork, key));
  }

  put(artwork: RgbaImage, key: string, value: T): T {
    let entries = this.byBuffer.get(artwork.data.buffer);
    if (!entries) this.byBuffer.set(artwork.data.buffer, (entries = new Map()));
    if (entries.size >= this.maxEntries) entries.delete(entries.keys().next().value!);
    entries.set(fullKey(artwork, key), value);
    return value;
  }

  get(artwork: RgbaImage, key: string, make: () => T): T {
    return this.peek(artwork, key) ?? this.put(artwork, key, make());
  }
}

function fullKey(artwork: RgbaImage, key: string): string {
  return `${artwork.data.byteOffset}:${artwork.width}x${artwork.height}:${key}`;
}
